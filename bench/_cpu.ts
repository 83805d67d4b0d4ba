import { readFileSync } from "node:fs";
import { inflateRawSync } from "node:zlib";
import { parseOptions } from "../lib/geometry/options";
import { countEdgesOffThread, readThreeMfOffThread } from "../lib/jobs/proof-thread";
import { fillValue, provePlate, provePlateAsync } from "../lib/proof";
import { BENCH_OPTIONS } from "./kit";
const stl = new Uint8Array(readFileSync("/tmp/bench.stl"));
const threeMf = new Uint8Array(readFileSync("/tmp/bench.3mf"));
const options = parseOptions(BENCH_OPTIONS);
const base = { stl, threeMf, inflateRaw: (d: Uint8Array, s?: number) => inflateRawSync(d, s ? { chunkSize: s + 1 } : {}), options, pieces: 24, qrValue: fillValue(options.marks.qr!.value, {}) };
const cpu = (u: NodeJS.CpuUsage) => ((u.user + u.system) / 1000).toFixed(0);
for (let k = 0; k < 5; k++) {
  let c = process.cpuUsage(), t = performance.now();
  provePlate(base);
  const a = [(performance.now() - t).toFixed(0), cpu(process.cpuUsage(c))];
  c = process.cpuUsage(); t = performance.now();
  await provePlateAsync({ ...base, readThreeMf: readThreeMfOffThread, countEdges: countEdgesOffThread });
  const b = [(performance.now() - t).toFixed(0), cpu(process.cpuUsage(c))];
  console.log("one thread wall/cpu", a, "two threads", b);
}
