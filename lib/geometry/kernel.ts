import Module, { type CrossSection, type Manifold, type ManifoldToplevel } from "manifold-3d";

/**
 * The manifold-3d WASM kernel, loaded once per thread by the caller (a route's process, a worker
 * thread, a browser Web Worker) and passed in explicitly — no module-level instance, so tests and
 * workers can hold their own.
 *
 * Kernel objects live in WASM memory that JavaScript's garbage collector never frees, and the heap
 * never shrinks: every Manifold and CrossSection must be deleted (a `Mesh` is a plain JS object). `Scope` tracks them in one place; `live`
 * counts
 * objects created through scopes and not yet deleted, so tests can assert it returns to zero.
 */
export type Kernel = {
  wasm: ManifoldToplevel;
  /** Objects created through scopes and not yet deleted. */
  live: () => number;
  scope: () => Scope;
};

type Deletable = { delete(): void };

export class Scope {
  private readonly items: Deletable[] = [];
  constructor(private readonly counter: { n: number }) {}

  /** Track a kernel object for deletion when the scope closes. */
  track<T extends Manifold | CrossSection>(obj: T): T {
    this.items.push(obj);
    this.counter.n++;
    return obj;
  }

  /** Stop tracking an object (its ownership moves to the caller, who must delete it). */
  release<T extends Deletable>(obj: T): T {
    const i = this.items.lastIndexOf(obj);
    if (i >= 0) {
      this.items.splice(i, 1);
      this.counter.n--;
    }
    return obj;
  }

  /** Delete one tracked object now. */
  drop(obj: Deletable): void {
    const i = this.items.lastIndexOf(obj);
    if (i >= 0) this.items.splice(i, 1);
    obj.delete();
    this.counter.n--;
  }

  close(): void {
    for (let i = this.items.length - 1; i >= 0; i--) {
      try {
        this.items[i]!.delete();
      } catch {
        // already deleted by the kernel's own ownership rules; nothing to free
      }
    }
    this.counter.n -= this.items.length;
    this.items.length = 0;
  }
}

export type KernelOptions = { locateFile?: () => string; wasmBinary?: ArrayBuffer | Uint8Array };

export async function loadKernel(options: KernelOptions = {}): Promise<Kernel> {
  const wasm = await (Module as (config?: KernelOptions) => Promise<ManifoldToplevel>)(Object.keys(options).length ? options : undefined);
  wasm.setup();
  const counter = { n: 0 };
  return { wasm, live: () => counter.n, scope: () => new Scope(counter) };
}

/** Run `fn` with a fresh scope that is closed (every tracked object deleted) however `fn` ends. */
export function withScope<T>(kernel: Kernel, fn: (scope: Scope) => T): T {
  const scope = kernel.scope();
  try {
    return fn(scope);
  } finally {
    scope.close();
  }
}
