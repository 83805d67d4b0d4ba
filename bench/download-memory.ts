/**
 * Memory of sending a 30 MB plate file 8 times at once, measured in one run: the blob store's stream
 * (`open`, as the file routes send it) against reading it whole (`get`, as they did), each through a
 * web Response read to its end by a slow reader, with this process's peak RSS rise printed for each.
 * Target: the streamed path raises RSS by less than 50 MB. (This measures the routes' sending path in
 * one process; the app's own RSS under real requests is in bench/api.ts's environment.)
 *   node --expose-gc --import tsx bench/download-memory.ts
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { DiskBlobStore } from "../lib/storage/disk";

const root = mkdtempSync(path.join(tmpdir(), "slab-dlmem-"));
const store = new DiskBlobStore(root);
const size = 30 * 1024 * 1024;
const bytes = new Uint8Array(size);
for (let i = 0; i < size; i++) bytes[i] = (i * 2654435761) >>> 24;
const { key } = await store.put(bytes);
const gc = (globalThis as { gc?: () => void }).gc ?? (() => {});

async function drain(res: Response) {
  const reader = res.body!.getReader();
  // A client reading at its own pace: one chunk a turn of the event loop.
  for (let r = await reader.read(); !r.done; r = await reader.read()) await new Promise((ok) => setImmediate(ok));
}

async function peakRise(send: () => Promise<Response>): Promise<number> {
  gc();
  await new Promise((r) => setTimeout(r, 100));
  const base = process.memoryUsage().rss;
  let peak = base;
  const timer = setInterval(() => (peak = Math.max(peak, process.memoryUsage().rss)), 5);
  await Promise.all(Array.from({ length: 8 }, async () => drain(await send())));
  clearInterval(timer);
  peak = Math.max(peak, process.memoryUsage().rss);
  return (peak - base) / 1e6;
}

const streamed = await peakRise(async () => {
  const b = await store.open(key);
  return new Response(b.stream, { headers: { "Content-Length": String(b.size) } });
});
const whole = await peakRise(async () => new Response((await store.get(key)) as Uint8Array<ArrayBuffer>));
console.log(`8 × 30 MB at once: streamed RSS rise ${streamed.toFixed(1)} MB (target < 50), read whole ${whole.toFixed(1)} MB`);
console.log(`streamed ÷ whole ${(streamed / whole).toFixed(2)}; target ${streamed < 50 ? "met" : "not met"}`);
rmSync(root, { recursive: true, force: true });
