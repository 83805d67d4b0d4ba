import type { FontBook } from "./fonts";
import type { Kernel, Scope } from "./kernel";
import type { SlabOptions } from "./options";

/**
 * What every step of a build reads. One scope per build: every kernel object a step makes is tracked
 * in it and freed when the build ends, however it ends.
 */
export type PlateContext = {
  kernel: Kernel;
  scope: Scope;
  /** The options with every default filled in. */
  options: SlabOptions;
  fonts: FontBook;
  /** The placeholders' values ({date} always among them). */
  vars: Record<string, string>;
};

/** Stage timings for `stats.timings` (ms, one decimal): each lap is the time since the one before. */
export class Laps {
  readonly timings: Record<string, number> = {};
  private last = performance.now();

  lap(name: string): void {
    const t = performance.now();
    this.timings[name] = Math.round((t - this.last) * 10) / 10;
    this.last = t;
  }
}

export type Box = { minX: number; minY: number; maxX: number; maxY: number };
