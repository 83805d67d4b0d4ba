"use client";

import { MATERIALS, type Material } from "@/lib/geometry/options";
import { EXPORT_FORMAT_IDS, EXPORT_FORMATS } from "@/lib/geometry/formats";
import type { Making } from "./use-make-plate";

/** The plate's build as a sentence (the state itself is the panel's data-state). */
const MAKING_WORDS: Record<string, string> = {
  queued: "Waiting for a worker…",
  running: "Building and checking the plate…",
  done: "Ready: the plate is made and has passed its proof.",
  failed: "Not made.",
};

/** "Make the plate", its progress and downloads, and the cautions for printing and selling it. */
export function MakePanel({
  making,
  disabled,
  onMake,
  material,
  smallParts,
  missing = [],
  refusal,
}: {
  making: Making | null;
  disabled: boolean;
  onMake: () => void;
  material: Material;
  smallParts: boolean;
  /** Placeholders with no value: the plate cannot be made until each has one. */
  missing?: string[];
  /** The newest preview's error, if any: the plate is not made until it is fixed. */
  refusal?: string;
}) {
  return (
    <section className="card space-y-2 p-3">
      <button type="button" className="btn-primary w-full" disabled={disabled} onClick={onMake}>
        Make the plate
      </button>
      {refusal ? (
        <p className="text-xs text-finding-error" data-testid="make-refusal">
          <span aria-hidden="true">✕ </span>Not until this is fixed: {refusal}
        </p>
      ) : null}
      {missing.length ? (
        <p className="text-xs text-finding-warning">⚠ Give a value for {missing.map((n) => `{${n}}`).join(", ")} under Values first.</p>
      ) : null}
      {making ? (
        <div data-testid="make-status" data-state={making.status}>
          <progress className="h-1.5 w-full accent-[#6d4aff]" max={1} value={making.progress} aria-label="Build progress" />
          <p className="text-xs text-muted">
            {MAKING_WORDS[making.status] ?? making.status}
            {making.message ? ` ${making.message}` : ""}
          </p>
          {making.status === "done" && making.plateId ? (
            <p className="space-x-3 text-xs">
              {EXPORT_FORMAT_IDS.map((f) => (
                <a key={f} className="text-accent underline" href={`/api/plates/${making.plateId}/download?format=${f}`}>
                  Download {EXPORT_FORMATS[f].label}
                </a>
              ))}
            </p>
          ) : null}
        </div>
      ) : null}
      <ul className="list-disc space-y-0.5 pl-4 text-xs text-muted" data-testid="cautions">
        <li>Keep the air gap in your slicer (support gap settings), or the pieces fuse to the slab.</li>
        <li>The nozzle (≈190–260 °C) and bed (up to ≈110 °C) are hot: let the plate cool before lifting the slab.</li>
        {MATERIALS[material]?.styrene ? (
          <li className="text-finding-warning">⚠ {material} gives off styrene and fine particles while printing: ventilate the room.</li>
        ) : null}
        {smallParts ? (
          <li className="text-finding-warning">⚠ Small parts: not for children under 3; follow the rules where you sell.</li>
        ) : null}
      </ul>
    </section>
  );
}
