import { createHash } from "node:crypto";
import { expect, it } from "vitest";
import { BadBlobKeyError, BlobNotFoundError, type BlobStore } from "@/lib/storage/types";

/** What every blob store must do, run against each adapter (disk, S3). */
export function blobStoreContract(getStore: () => BlobStore) {
  it("round-trips bytes under their SHA-256 (FIPS 180-4 digest via node:crypto)", async () => {
    const store = getStore();
    const bytes = new TextEncoder().encode(`a slab of bytes ${store.kind}`);
    const put = await store.put(bytes);
    expect(put.key).toBe(createHash("sha256").update(bytes).digest("hex"));
    expect(put.created).toBe(true);
    expect(await store.has(put.key)).toBe(true);
    expect(Buffer.from(await store.get(put.key)).equals(Buffer.from(bytes))).toBe(true);
    expect(await store.put(bytes)).toEqual({ key: put.key, size: bytes.length, created: false });
  });

  it("keeps large binary content byte for byte", async () => {
    const store = getStore();
    const bytes = new Uint8Array(3_000_000);
    for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 2654435761) >>> 24;
    const { key } = await store.put(bytes);
    const back = await store.get(key);
    expect(back.byteLength).toBe(bytes.byteLength);
    expect(createHash("sha256").update(back).digest("hex")).toBe(key);
  });

  it("deletes, and a missing key is a typed error", async () => {
    const store = getStore();
    const { key } = await store.put(new Uint8Array([1, 2, 3, store.kind.length]));
    await store.delete(key);
    expect(await store.has(key)).toBe(false);
    await expect(store.get(key)).rejects.toBeInstanceOf(BlobNotFoundError);
    await store.delete(key); // deleting twice is fine
  });

  it("never turns a user-supplied name into a path or object name", async () => {
    const store = getStore();
    for (const bad of ["../../etc/passwd", "part.stl", "A".repeat(64), "", `${"0".repeat(63)}/`]) {
      await expect(store.get(bad)).rejects.toBeInstanceOf(BadBlobKeyError);
      await expect(store.has(bad)).rejects.toBeInstanceOf(BadBlobKeyError);
    }
  });
}
