/**
 * Plates per minute for the demo kit on the synchronous API path, with the worker's pool at 1 and at
 * 2 threads, p50/p95 latency, and pool efficiency = (plates/min at 2 threads) ÷ (2 × in-process
 * builds/min), all measured in one run. Needs the app and the database: run it while `npm start` is
 * up (it starts and stops its own workers; stop the one `npm start` started first for clean numbers).
 *   SLAB_BENCH_URL=http://localhost:3000 npx tsx bench/api.ts
 */
import { spawn } from "node:child_process";
import { readFileSync } from "node:fs";
import { buildPlate, newPartCache } from "../lib/geometry/build-plate";
import { DEMO_PAWN_SEGMENTS, hexTile, pawn } from "../lib/geometry/demo-shapes";
import { loadKernel } from "../lib/geometry/kernel";
import { orientMesh } from "../lib/geometry/orient";
import { benchFonts } from "./kit";

const base = process.env.SLAB_BENCH_URL ?? "http://localhost:3000";
const creds = JSON.parse(readFileSync(".data/demo-credentials.json", "utf8")) as { apiKey: string };
const kits = (await (await fetch(`${base}/api/v1/kits`, { headers: { authorization: `Bearer ${creds.apiKey}` } })).json()) as { kits: { id: string }[] };
const kitId = kits.kits[0]!.id;
const N = Number(process.env.SLAB_BENCH_PLATES ?? 30);

async function runApi(threads: number) {
  const worker = spawn(process.execPath, ["--import", "tsx", "scripts/worker.ts"], { env: { ...process.env, SLAB_WORKER_THREADS: String(threads) }, stdio: "ignore" });
  await new Promise((r) => setTimeout(r, 3000)); // threads up, kernel loaded
  const lat: number[] = [];
  const started = performance.now();
  let next = 0;
  await Promise.all(
    Array.from({ length: threads * 2 }, async () => {
      while (next < N) {
        next++;
        const f = new FormData();
        f.append("kit", kitId);
        f.append("format", "stl");
        const t = performance.now();
        const r = await fetch(`${base}/api/v1/plates`, { method: "POST", headers: { authorization: `Bearer ${creds.apiKey}` }, body: f });
        await r.arrayBuffer();
        if (r.status !== 200) throw new Error(`HTTP ${r.status}`);
        lat.push(performance.now() - t);
      }
    }),
  );
  const minutes = (performance.now() - started) / 60_000;
  worker.kill("SIGTERM");
  await new Promise((r) => setTimeout(r, 1500));
  lat.sort((a, b) => a - b);
  return { perMin: lat.length / minutes, p50: lat[Math.floor(lat.length * 0.5)]!, p95: lat[Math.floor(lat.length * 0.95)]! };
}

// In-process floor: the same kit built back to back in this process.
const kernel = await loadKernel();
const fonts = benchFonts();
const parts = [
  { id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 4 },
  { id: "pawn", name: "Beacon pawn", mesh: orientMesh(pawn(DEMO_PAWN_SEGMENTS)), quantity: 2 },
];
const cache = newPartCache(); // as the worker threads keep one
buildPlate(kernel, { parts, fonts, formats: ["stl", "3mf"], cache });
const t0 = performance.now();
for (let i = 0; i < N; i++) buildPlate(kernel, { parts, fonts, formats: ["stl", "3mf"], cache });
const inProcessPerMin = N / ((performance.now() - t0) / 60_000);

const one = await runApi(1);
const two = await runApi(2);
const f = (n: number) => n.toFixed(0);
console.log(`in-process builds/min ${f(inProcessPerMin)}`);
console.log(`API, 1 thread: ${f(one.perMin)} plates/min, p50 ${f(one.p50)} ms, p95 ${f(one.p95)} ms`);
console.log(`API, 2 threads: ${f(two.perMin)} plates/min, p50 ${f(two.p50)} ms, p95 ${f(two.p95)} ms`);
console.log(`pool efficiency ${(two.perMin / (2 * inProcessPerMin)).toFixed(2)} (target ≥ 0.8)`);
