/**
 * The second thread of a plate's proof: the 3MF package read (node:zlib inflates the model part) and
 * the welded STL's edges counted, while the calling build thread checks the rest of the STL.
 * Messages: in `{ id, task: "3mf", bytes }` or `{ id, task: "edges", triangles, positions, tris }`;
 * out `{ id, result }` or `{ id, error, proofError }`.
 */
import { inflateRawSync } from "node:zlib";
import { parentPort } from "node:worker_threads";
import type { WeldedStl } from "@/lib/proof/stl";
import { readThreeMfBodies, ThreeMfProofError } from "@/lib/proof/three-mf";
import { edgeReport } from "@/lib/proof/topology";

// One output buffer of the size the zip directory states (one byte more, so zlib ends there).
const inflate = (d: Uint8Array, size?: number) => inflateRawSync(d, size ? { chunkSize: Math.max(64, size + 1) } : {});

type Task = { id: number; task: "3mf"; bytes: Uint8Array } | ({ id: number; task: "edges" } & WeldedStl);

parentPort?.on("message", (m: Task) => {
  try {
    const result = m.task === "3mf" ? readThreeMfBodies(m.bytes, inflate) : edgeReport(m);
    parentPort!.postMessage({ id: m.id, result });
  } catch (err) {
    parentPort!.postMessage({
      id: m.id,
      error: err instanceof Error ? err.message : String(err),
      proofError: err instanceof ThreeMfProofError,
    });
  }
});
