import "server-only";
import { apiError } from "@/lib/api/respond";
import { IMPORT_LIMITS } from "@/lib/geometry/import";

/** Largest mesh upload accepted, bytes (SLAB_MAX_UPLOAD_BYTES overrides the engine's 200 MB default). */
export function maxUploadBytes(): number {
  const v = Number(process.env.SLAB_MAX_UPLOAD_BYTES);
  return Number.isFinite(v) && v > 0 ? v : IMPORT_LIMITS.maxBytes;
}

/**
 * Read a request body up to `max` bytes. A declared Content-Length over the limit is refused before
 * any of the body is read; a body that turns out longer is cut off the moment it passes the limit.
 */
export async function readLimited(req: Request, max: number): Promise<Uint8Array | Response> {
  const tooLarge = () => apiError(413, "file_too_large", `The file is larger than the ${(max / 1024 / 1024).toFixed(0)} MB limit for one upload.`, { limit: max });
  const declared = Number(req.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > max) return tooLarge();
  if (!req.body) return new Uint8Array(0);
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > max) {
      await reader.cancel();
      return tooLarge();
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let o = 0;
  for (const c of chunks) {
    out.set(c, o);
    o += c.byteLength;
  }
  return out;
}
