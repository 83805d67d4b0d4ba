import { createHash } from "node:crypto";
import { expect, it } from "vitest";
import { BadBlobKeyError, BlobNotFoundError, BlobTooLargeError, type BlobStore } from "@/lib/storage/types";

async function* chunks(total: number, size: number, onPull?: (n: number) => void) {
  let sent = 0;
  while (sent < total) {
    const n = Math.min(size, total - sent);
    const c = new Uint8Array(n);
    for (let i = 0; i < n; i++) c[i] = ((sent + i) * 2654435761) >>> 24;
    sent += n;
    onPull?.(sent);
    yield c;
  }
}

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

  it("stores a stream under the same key as the same bytes put whole", async () => {
    const store = getStore();
    const whole = new Uint8Array(2_500_000);
    let o = 0;
    for await (const c of chunks(whole.length, 65_536)) {
      whole.set(c, o);
      o += c.length;
    }
    const streamed = await store.putStream(chunks(whole.length, 65_536));
    expect(streamed).toMatchObject({ key: createHash("sha256").update(whole).digest("hex"), size: whole.length });
    expect(await store.put(whole)).toEqual({ key: streamed.key, size: whole.length, created: false });
    expect((await store.putStream(chunks(whole.length, 10_000))).created).toBe(false);
    expect(
      createHash("sha256")
        .update(await store.get(streamed.key))
        .digest("hex"),
    ).toBe(streamed.key);
  });

  it("stops a stream past its limit, reading no further and storing nothing", async () => {
    // ASVS 4.0 V12.1.1: the size limit holds for a body of unknown length too.
    const store = getStore();
    let pulled = 0;
    await expect(
      store.putStream(
        chunks(10_000_000, 100_000, (n) => (pulled = n)),
        { maxBytes: 1_000_000 },
      ),
    ).rejects.toBeInstanceOf(BlobTooLargeError);
    expect(pulled).toBeLessThanOrEqual(1_100_000);
    const firstMb = new Uint8Array(1_000_000);
    let o = 0;
    for await (const c of chunks(1_000_000, 100_000)) {
      firstMb.set(c, o);
      o += c.length;
    }
    expect(await store.has(createHash("sha256").update(firstMb).digest("hex"))).toBe(false);
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

  it("streams a blob as read: the same bytes (SHA-256 = key), its size first, a missing key refused before any byte", async () => {
    const store = getStore();
    const bytes = new Uint8Array(3_000_000);
    for (let i = 0; i < bytes.length; i++) bytes[i] = (i * 2654435761) >>> 24;
    const { key } = await store.put(bytes);
    const blob = await store.open(key);
    expect(blob.size).toBe(bytes.byteLength);
    const hash = createHash("sha256");
    let chunksRead = 0;
    const all = blob.stream.getReader();
    for (let r = await all.read(); !r.done; r = await all.read()) {
      hash.update(r.value);
      chunksRead++;
    }
    expect(hash.digest("hex")).toBe(key);
    // Read in pieces, not whole (the point of a stream).
    expect(chunksRead).toBeGreaterThan(1);
    await expect(store.open("0".repeat(64))).rejects.toBeInstanceOf(BlobNotFoundError);
    // A reader that goes away after the first chunk: cancelling ends the stream without an error.
    const again = await store.open(key);
    const reader = again.stream.getReader();
    expect((await reader.read()).done).toBe(false);
    await reader.cancel();
  });
}
