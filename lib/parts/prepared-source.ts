import { createHash } from "node:crypto";
import { PREPARED_VERSION } from "@/lib/geometry/prepared";

/** How a part is read for a build: its stored file and the choices that change the mesh. */
export type PreparedReading = { blobKey: string; unit?: string; layFlat?: boolean; turned?: boolean; rotation?: number };

/** The key a prepared part is found by: SHA-256 of the engine's version and everything that shapes the mesh. */
export function preparedSource(r: PreparedReading): string {
  const what = [PREPARED_VERSION, r.blobKey, r.unit ?? "", Boolean(r.layFlat), Boolean(r.turned), r.rotation ?? 0];
  return createHash("sha256").update(JSON.stringify(what)).digest("hex");
}
