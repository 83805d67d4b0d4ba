/**
 * The options-table property test (lib/geometry/plate-properties.test.ts) at length: `npm test`
 * draws 300 seeded option sets; this draws SLAB_PROPERTY_RUNS (default 3000) from the same seed and
 * reports how many were built and proven, how many refused, and the time per case.
 *   npx tsx bench/properties.ts
 */
import { spawnSync } from "node:child_process";

const runs = Number(process.env.SLAB_PROPERTY_RUNS ?? 3000);
const t = performance.now();
const r = spawnSync("npx", ["vitest", "run", "--project", "unit", "lib/geometry/plate-properties.test.ts"], {
  stdio: "inherit",
  env: { ...process.env, SLAB_PROPERTY_RUNS: String(runs) },
});
const s = (performance.now() - t) / 1000;
console.log(
  `${runs} cases in ${s.toFixed(0)} s (${((s * 1000) / runs).toFixed(0)} ms a case, build + admesh + proof); ` +
    `${r.status === 0 ? "all refused at a field or proven" : "a case failed (see above)"}`,
);
process.exit(r.status ?? 1);
