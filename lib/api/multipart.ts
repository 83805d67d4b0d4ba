import "server-only";
import busboy from "busboy";
import { chunksOf, keepHead, type StoredUpload } from "@/lib/parts/upload";
import { blobStore, BlobTooLargeError } from "@/lib/storage";
import { AppError, BadRequest, TooLarge } from "@/lib/errors";

/** A file part of the form, already in the blob store. */
export type StoredFile = StoredUpload & { field: string; name: string };

/** A multipart form read as a stream: its text fields, and its `part` files stored as they arrived. */
export type StreamedForm = {
  get(name: string): string | null;
  has(name: string): boolean;
  /** Field names that came as files though they should be text (or the other way round for `part`). */
  fileFields: Set<string>;
  files: StoredFile[];
};

const tooLarge = (max: number) =>
  new TooLarge("file_too_large", `The request is larger than the ${(max / 1024 / 1024).toFixed(0)} MB limit.`, { limit: max });

/**
 * Read multipart/form-data with busboy as it arrives: the bytes of the whole body are counted as they
 * come (a chunked body has no Content-Length to check), reading stops the moment they pass `maxBytes`
 * (413), and each `part` file goes straight into the blob store, hashed on the way, never held in
 * memory. Text fields are capped (1 MB each, 100 in all) and so is the number of files.
 */
export async function readMultipart(
  req: Request,
  opts: { maxBytes: number; maxFiles?: number; maxFieldBytes?: number },
): Promise<StreamedForm> {
  const maxFiles = opts.maxFiles ?? 100;
  const maxFieldBytes = opts.maxFieldBytes ?? 1024 * 1024;
  let bb: busboy.Busboy;
  try {
    bb = busboy({
      headers: { "content-type": req.headers.get("content-type") ?? "" },
      limits: { files: maxFiles, fields: 100, fieldSize: maxFieldBytes, parts: maxFiles + 100 },
    });
  } catch {
    throw new BadRequest("bad_request", "The multipart body could not be read (no boundary).");
  }
  const fields = new Map<string, string>();
  const fileFields = new Set<string>();
  const stores: Promise<StoredFile>[] = [];
  let failure: unknown = null;
  const fail = (err: unknown) => {
    failure ??= err;
  };

  bb.on("file", (field, stream, info) => {
    if (field !== "part") {
      fileFields.add(field);
      stream.resume();
      return;
    }
    const { stream: counted, head } = keepHead(stream);
    const stored = blobStore()
      .putStream(counted, { maxBytes: opts.maxBytes })
      .then((s): StoredFile => ({ ...s, head: head(), field, name: info.filename ?? "" }));
    stored.catch((err: unknown) => {
      fail(err instanceof BlobTooLargeError ? tooLarge(opts.maxBytes) : err);
      stream.resume();
    });
    stores.push(stored);
  });
  bb.on("field", (name, value, info) => {
    if (info.valueTruncated)
      fail(
        new TooLarge("field_too_large", `The field ${name.slice(0, 40)} is longer than ${(maxFieldBytes / 1024 / 1024).toFixed(0)} MB.`),
      );
    else if (name === "part") fileFields.add(name);
    else fields.set(name, value);
  });
  bb.on("filesLimit", () => fail(new TooLarge("too_many_files", `Send at most ${maxFiles} part files in one request.`)));
  bb.on("fieldsLimit", () => fail(new TooLarge("too_many_fields", "The form has too many fields.")));
  bb.on("partsLimit", () => fail(new TooLarge("too_many_fields", "The form has too many parts.")));
  const closed = new Promise<void>((resolve, reject) => {
    bb.on("close", resolve);
    bb.on("error", () => reject(new BadRequest("bad_request", "The multipart body could not be read.")));
  });
  closed.catch(() => undefined);

  let total = 0;
  try {
    for await (const chunk of chunksOf(req.body)) {
      total += chunk.byteLength;
      if (total > opts.maxBytes) fail(tooLarge(opts.maxBytes));
      if (failure) break; // leaving the loop cancels the request body: the rest is never read
      if (!bb.write(chunk)) await Promise.race([new Promise((r) => bb.once("drain", r)), closed]);
    }
  } catch (err) {
    fail(err instanceof AppError ? err : new BadRequest("bad_request", "The request body was cut off."));
  }
  if (failure) {
    bb.destroy();
    await Promise.allSettled(stores);
    throw failure;
  }
  bb.end();
  await closed;
  const files = await Promise.all(stores);
  if (failure) throw failure;
  return { get: (n) => (fileFields.has(n) ? null : (fields.get(n) ?? null)), has: (n) => fields.has(n), fileFields, files };
}
