import { createHash, randomBytes } from "node:crypto";
import { promises as fs } from "node:fs";
import path from "node:path";
import { BlobTooLargeError } from "./types";

export type Spooled = { file: string; key: string; size: number };

/**
 * Write a stream to a new file in `dir`, hashing (SHA-256) and counting as it goes. Past `maxBytes`
 * the source is abandoned (its iterator's return() lets the producer stop) and the file removed.
 * Memory use is one chunk, whatever the stream's length.
 */
export async function spool(source: AsyncIterable<Uint8Array>, dir: string, maxBytes = Infinity): Promise<Spooled> {
  await fs.mkdir(dir, { recursive: true });
  const file = path.join(dir, `${Date.now().toString(36)}.${randomBytes(8).toString("hex")}`);
  const handle = await fs.open(file, "wx");
  const hash = createHash("sha256");
  let size = 0;
  try {
    for await (const chunk of source) {
      size += chunk.byteLength;
      if (size > maxBytes) throw new BlobTooLargeError(maxBytes);
      hash.update(chunk);
      await handle.write(chunk);
    }
    await handle.sync();
  } catch (err) {
    await handle.close().catch(() => undefined);
    await fs.rm(file, { force: true });
    throw err;
  }
  await handle.close();
  return { file, key: hash.digest("hex"), size };
}
