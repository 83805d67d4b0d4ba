import { randomBytes } from "node:crypto";
import { promises as fs } from "node:fs";
import path from "node:path";
import { Readable } from "node:stream";
import { sha256Hex } from "./hash";
import { spool } from "./spool";
import { assertKey, BlobNotFoundError, type BlobStore, type StoredBlob } from "./types";

/**
 * Blobs on local disk: <root>/ab/cd/<key>. A write goes to <root>/.tmp first, is flushed, then renamed
 * into place, so a crash never leaves a half-written file under a real key.
 */
export class DiskBlobStore implements BlobStore {
  readonly kind = "disk" as const;
  constructor(private readonly root: string) {}

  private pathFor(key: string): string {
    assertKey(key);
    return path.join(this.root, key.slice(0, 2), key.slice(2, 4), key);
  }

  async put(bytes: Uint8Array): Promise<StoredBlob> {
    const key = sha256Hex(bytes);
    const final = this.pathFor(key);
    if (await exists(final)) return { key, size: bytes.byteLength, created: false };
    const tmpDir = path.join(this.root, ".tmp");
    await fs.mkdir(tmpDir, { recursive: true });
    await fs.mkdir(path.dirname(final), { recursive: true });
    const tmp = path.join(tmpDir, `${key}.${randomBytes(6).toString("hex")}`);
    const handle = await fs.open(tmp, "wx");
    try {
      await handle.writeFile(bytes);
      await handle.sync();
    } finally {
      await handle.close();
    }
    try {
      await fs.rename(tmp, final);
    } catch (err) {
      await fs.rm(tmp, { force: true });
      throw err;
    }
    return { key, size: bytes.byteLength, created: true };
  }

  async putStream(source: AsyncIterable<Uint8Array>, opts: { maxBytes?: number } = {}): Promise<StoredBlob> {
    const tmp = await spool(source, path.join(this.root, ".tmp"), opts.maxBytes);
    const final = this.pathFor(tmp.key);
    try {
      if (await exists(final)) {
        await fs.rm(tmp.file, { force: true });
        return { key: tmp.key, size: tmp.size, created: false };
      }
      await fs.mkdir(path.dirname(final), { recursive: true });
      await fs.rename(tmp.file, final);
    } catch (err) {
      await fs.rm(tmp.file, { force: true });
      throw err;
    }
    return { key: tmp.key, size: tmp.size, created: true };
  }

  async get(key: string): Promise<Uint8Array> {
    try {
      return new Uint8Array(await fs.readFile(this.pathFor(key)));
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === "ENOENT") throw new BlobNotFoundError(key);
      throw err;
    }
  }

  async open(key: string): Promise<{ size: number; stream: ReadableStream<Uint8Array> }> {
    let handle: fs.FileHandle;
    try {
      handle = await fs.open(this.pathFor(key), "r");
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === "ENOENT") throw new BlobNotFoundError(key);
      throw err;
    }
    try {
      const { size } = await handle.stat();
      // The read stream closes the handle when it ends or is destroyed (a cancelled web stream destroys it).
      const stream = Readable.toWeb(handle.createReadStream({ highWaterMark: 256 * 1024 })) as ReadableStream<Uint8Array>;
      return { size, stream };
    } catch (err) {
      await handle.close();
      throw err;
    }
  }

  async has(key: string): Promise<boolean> {
    return exists(this.pathFor(key));
  }

  async delete(key: string): Promise<void> {
    await fs.rm(this.pathFor(key), { force: true });
  }
}

async function exists(p: string): Promise<boolean> {
  try {
    await fs.access(p);
    return true;
  } catch {
    return false;
  }
}
