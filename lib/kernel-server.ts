import "server-only";
import { loadKernel, type Kernel } from "@/lib/geometry/kernel";

// One kernel per server process (the WASM build is single-threaded; builds move to worker threads
// with the job queue). Loaded on first use, kept on globalThis across dev-mode module reloads.
const g = globalThis as unknown as { __slabKernel?: Promise<Kernel> };

export function serverKernel(): Promise<Kernel> {
  g.__slabKernel ??= loadKernel();
  return g.__slabKernel;
}
