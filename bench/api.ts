/**
 * Plates per minute for the demo kit on the synchronous API path, with the worker's pool at 1 and at
 * 2 threads, p50/p95 latency, and pool efficiency = (plates/min at 2 threads) ÷ (2 × in-process
 * builds/min), all measured in one run. Needs the app and the database: run it while `npm start` is
 * up (it starts and stops its own workers; stop the one `npm start` started first for clean numbers).
 *   SLAB_BENCH_URL=http://localhost:3000 npx tsx bench/api.ts
 */
import { spawn } from "node:child_process";
import { readdirSync, readFileSync } from "node:fs";
import { buildLoop, ORDER_OPTIONS, parallelCeiling } from "./parallel-floor";

const base = process.env.SLAB_BENCH_URL ?? "http://localhost:3000";
/** What each request asks for: the STL file (default), or json (the plate's record without the file). */
const FORMAT = process.env.SLAB_BENCH_FORMAT ?? "stl";
const creds = JSON.parse(readFileSync(".data/demo-credentials.json", "utf8")) as { apiKey: string };
const kits = (await (await fetch(`${base}/api/v1/kits`, { headers: { authorization: `Bearer ${creds.apiKey}` } })).json()) as {
  kits: { id: string }[];
};
const kitId = kits.kits[0]!.id;
const N = Number(process.env.SLAB_BENCH_PLATES ?? 30);

/** CPU seconds used so far by each kind of process on this machine (Linux /proc), to show where it goes. */
function cpuByKind(workerPid?: number): Record<string, number> {
  const out: Record<string, number> = {};
  const tick = 100; // USER_HZ
  for (const d of readdirSync("/proc")) {
    if (!/^\d+$/.test(d)) continue;
    try {
      const stat = readFileSync(`/proc/${d}/stat`, "utf8");
      const cmd = readFileSync(`/proc/${d}/cmdline`, "utf8").replace(/\0/g, " ");
      const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
      const secs = (Number(f[11]) + Number(f[12])) / tick;
      const kind =
        Number(d) === workerPid
          ? "worker (threads included)"
          : Number(d) === process.pid
            ? "benchmark client"
            : /next-server|next start|next\/dist|scripts\/serve\.mjs/.test(cmd) || stat.includes("(next-server")
              ? "Next server"
              : /postgres/.test(cmd)
                ? "PostgreSQL"
                : null;
      if (kind) out[kind] = (out[kind] ?? 0) + secs;
    } catch {
      // the process ended while being read
    }
  }
  return out;
}

async function runApi(threads: number) {
  const worker = spawn(process.execPath, ["--import", "tsx", "scripts/worker.ts"], {
    env: { ...process.env, SLAB_WORKER_THREADS: String(threads) },
    stdio: "ignore",
  });
  await new Promise((r) => setTimeout(r, 3000)); // threads up, kernel loaded
  const lat: number[] = [];
  const cpu0 = cpuByKind(worker.pid);
  const started = performance.now();
  let next = 0;
  await Promise.all(
    Array.from({ length: threads * 2 }, async () => {
      while (next < N) {
        next++;
        const f = new FormData();
        f.append("kit", kitId);
        f.append("format", FORMAT);
        // Every order engraves its own number, as real orders do (so no two slabs are the same).
        f.append("options", JSON.stringify(ORDER_OPTIONS));
        f.append("variables", JSON.stringify({ order: String(20000 + threads * 1000 + next) }));
        const t = performance.now();
        const r = await fetch(`${base}/api/v1/plates`, { method: "POST", headers: { authorization: `Bearer ${creds.apiKey}` }, body: f });
        await r.arrayBuffer();
        if (r.status !== 200) throw new Error(`HTTP ${r.status}`);
        lat.push(performance.now() - t);
      }
    }),
  );
  const minutes = (performance.now() - started) / 60_000;
  const cpu1 = cpuByKind(worker.pid);
  const perPlate = Object.entries(cpu1)
    .map(([k, v]) => `${k} ${(((v - (cpu0[k] ?? 0)) * 1000) / lat.length).toFixed(0)}`)
    .join(", ");
  console.log(`  ${threads} thread(s), CPU ms per plate: ${perPlate}`);
  worker.kill("SIGTERM");
  await new Promise((r) => setTimeout(r, 1500));
  lat.sort((a, b) => a - b);
  return { perMin: lat.length / minutes, p50: lat[Math.floor(lat.length * 0.5)]!, p95: lat[Math.floor(lat.length * 0.95)]! };
}

// In-process, before and after the API runs (the machine's speed drifts); the faster of the two counts.
const inProcess = () => buildLoop(N);
const before = await inProcess();

const one = await runApi(1);
const two = await runApi(2);
const after = await inProcess();
const inProcessPerMin = Math.max(before, after);
const f = (n: number) => n.toFixed(0);
console.log(`in-process builds/min ${f(inProcessPerMin)} (the faster of ${f(before)} before and ${f(after)} after the API runs)`);
console.log(`API, 1 thread: ${f(one.perMin)} plates/min, p50 ${f(one.p50)} ms, p95 ${f(one.p95)} ms`);
console.log(`API, 2 threads: ${f(two.perMin)} plates/min, p50 ${f(two.p50)} ms, p95 ${f(two.p95)} ms`);
console.log(`pool efficiency ${(two.perMin / (2 * inProcessPerMin)).toFixed(2)} (target ≥ 0.8)`);
// The most any pool could reach here: two threads building at once with no server, database or client.
const ceiling = await parallelCeiling(N);
console.log(
  `two threads in-process, nothing else running: ${ceiling.two.toFixed(0)} builds/min against ${ceiling.one.toFixed(0)} for one: ` +
    `ceiling ${ceiling.ceiling.toFixed(2)} on this machine`,
);
