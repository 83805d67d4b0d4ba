/**
 * Does a hostile upload stall the web process? `/api/health` latency, p50/p95, idle and then while
 * two hostile 3MF files are uploaded to the parts library and checked: an inflate bomb (400 MB of
 * content in under 1 MB) and a cube with a million vertices no triangle uses. Prints the ratio of the
 * p95s (target ≤ 2: the imports run in the worker, so the web process only streams their bytes).
 * Needs the app, its worker and the database: run it while `npm start` is up.
 *   SLAB_BENCH_URL=http://localhost:3000 npx tsx bench/upload-stall.ts
 */
import { inflateBomb, millionVertexFile } from "../tests/support/bombs";

const base = process.env.SLAB_BENCH_URL ?? "http://localhost:3000";
process.env.SLAB_TEST_BASE_URL ??= base;
process.env.SLAB_CREDENTIALS_FILE ??= ".data/demo-credentials.json";
const { demoUser, signInOverHttp } = await import("../tests/support/http");
const { sendPart, settled } = await import("../tests/support/uploads");

const GAP_MS = 20;
const IDLE_SAMPLES = Number(process.env.SLAB_BENCH_SAMPLES ?? 200);

async function healthMs(): Promise<number> {
  const t = performance.now();
  const r = await fetch(`${base}/api/health`);
  await r.arrayBuffer();
  if (r.status !== 200) throw new Error(`/api/health answered ${r.status}`);
  return performance.now() - t;
}

const pct = (xs: number[], p: number) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(s.length * p))]!;
};

const designer = await signInOverHttp(demoUser("designer").email, demoUser("designer").password);
const bomb = inflateBomb(400, false);
const dots = millionVertexFile(1_000_000);
for (let i = 0; i < 10; i++) await healthMs(); // warm up

const idle: number[] = [];
for (let i = 0; i < IDLE_SAMPLES; i++) {
  idle.push(await healthMs());
  await new Promise((r) => setTimeout(r, GAP_MS));
}

const during: number[] = [];
let busy = true;
const poller = (async () => {
  while (busy) {
    during.push(await healthMs());
    await new Promise((r) => setTimeout(r, GAP_MS));
  }
})();
const started = performance.now();
const outcomes = await Promise.all(
  [
    ["inflate bomb", bomb],
    ["million vertices", dots],
  ].map(async ([what, file]) => {
    const t = performance.now();
    const res = await sendPart(designer, `bench-${String(what).replace(/\s/g, "-")}.3mf`, file as Uint8Array);
    const answeredMs = performance.now() - t;
    const u = await settled(designer, res);
    return {
      what,
      bytes: (file as Uint8Array).byteLength,
      answeredMs,
      checkedMs: performance.now() - t,
      state: u.state,
      code: u.error?.code ?? "-",
    };
  }),
);
busy = false;
await poller;

const f = (n: number) => n.toFixed(1);
for (const o of outcomes) {
  console.log(
    `${o.what}: ${(o.bytes / 1024).toFixed(0)} kB, answered in ${f(o.answeredMs)} ms (checking), ${o.state} (${o.code}) after ` +
      `${f(o.checkedMs)} ms`,
  );
}
console.log(`/api/health idle:   p50 ${f(pct(idle, 0.5))} ms, p95 ${f(pct(idle, 0.95))} ms (${idle.length} requests)`);
console.log(
  `/api/health during: p50 ${f(pct(during, 0.5))} ms, p95 ${f(pct(during, 0.95))} ms, max ${f(Math.max(...during))} ms ` +
    `(${during.length} requests over ${f((performance.now() - started) / 1000)} s)`,
);
console.log(`p95 during ÷ p95 idle: ${(pct(during, 0.95) / pct(idle, 0.95)).toFixed(2)} (target ≤ 2)`);
