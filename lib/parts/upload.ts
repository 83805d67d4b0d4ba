import "server-only";
import { env } from "@/lib/env";
import { Invalid, TooLarge, UnsupportedMedia } from "@/lib/errors";
import { sniffHead } from "@/lib/geometry/io/sniff";
import { ACCEPTED_FORMATS } from "@/lib/geometry/formats";
import { blobStore, BlobTooLargeError, type StoredBlob } from "@/lib/storage";

/** Largest mesh upload accepted, bytes (SLAB_MAX_UPLOAD_BYTES overrides the engine's 200 MB default). */
export function maxUploadBytes(): number {
  return env().SLAB_MAX_UPLOAD_BYTES;
}

export const tooLarge = (max: number, what = "The file") =>
  new TooLarge("file_too_large", `${what} is larger than the ${(max / 1024 / 1024).toFixed(0)} MB limit for one upload.`, { limit: max });

/** How many of a stream's first bytes are kept to tell its format (sniffHead). */
export const HEAD_BYTES = 4096;

/** Pass a stream through unchanged, keeping a copy of its first HEAD_BYTES bytes. */
export function keepHead(source: AsyncIterable<Uint8Array>): { stream: AsyncIterable<Uint8Array>; head: () => Uint8Array } {
  const head = new Uint8Array(HEAD_BYTES);
  let held = 0;
  return {
    head: () => head.slice(0, held),
    stream: (async function* () {
      for await (const chunk of source) {
        if (held < HEAD_BYTES) {
          const n = Math.min(HEAD_BYTES - held, chunk.byteLength);
          head.set(chunk.subarray(0, n), held);
          held += n;
        }
        yield chunk;
      }
    })(),
  };
}

/** A web stream as an async iterable; leaving the loop early cancels the stream (the client's upload stops being read). */
export async function* chunksOf(body: ReadableStream<Uint8Array> | null): AsyncGenerator<Uint8Array> {
  if (!body) return;
  const reader = body.getReader();
  let done = false;
  try {
    for (;;) {
      const r = await reader.read();
      if (r.done) {
        done = true;
        return;
      }
      yield r.value;
    }
  } finally {
    if (!done) await reader.cancel().catch(() => undefined);
  }
}

export type StoredUpload = StoredBlob & { head: Uint8Array };

/**
 * Stream a request body straight into the blob store (hashed as it arrives, one chunk in memory), up
 * to `max` bytes. A declared Content-Length over the limit is refused before any of the body is read;
 * a body that turns out longer (chunked, or lying) is cut off the moment it passes the limit.
 */
export async function storeBody(req: Request, max: number): Promise<StoredUpload> {
  const declared = Number(req.headers.get("content-length"));
  if (Number.isFinite(declared) && declared > max) throw tooLarge(max);
  const { stream, head } = keepHead(chunksOf(req.body));
  try {
    const stored = await blobStore().putStream(stream, { maxBytes: max });
    return { ...stored, head: head() };
  } catch (err) {
    if (err instanceof BlobTooLargeError) throw tooLarge(max);
    throw err;
  }
}

/**
 * Refuse at once what is plainly not a mesh, from its first bytes (cheap; the worker's import says
 * what is wrong with the rest). A file named .stl that matches nothing still goes to the STL reader,
 * which names the problem, as long as it is long enough to be one.
 */
export function plainRefusal(upload: StoredUpload, fileName: string): Invalid | UnsupportedMedia | null {
  const details = { file: fileName };
  if (upload.size === 0) return new Invalid("empty", "the file is empty", details);
  if (sniffHead(upload.head, upload.size)) return null;
  if (upload.size >= 84 && /\.stl$/i.test(fileName)) return null;
  return new UnsupportedMedia(
    "not_a_mesh",
    `this is not a mesh file we recognise. Slabwright reads ${ACCEPTED_FORMATS.join(", ")}.`,
    details,
  );
}
