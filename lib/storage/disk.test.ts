import { mkdtempSync, readdirSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { blobStoreContract } from "@/tests/support/blob-store-contract";
import { DiskBlobStore } from "./disk";

const root = mkdtempSync(path.join(tmpdir(), "slab-blobs-"));
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe("disk blob store", () => {
  const store = new DiskBlobStore(root);
  blobStoreContract(() => store);

  it("closes the file when a reader cancels the stream (no descriptor left open: Linux /proc/self/fd)", async () => {
    const { key } = await store.put(new Uint8Array(2_000_000).fill(3));
    const open = () => readdirSync("/proc/self/fd").length;
    const before = open();
    for (let i = 0; i < 20; i++) {
      const reader = (await store.open(key)).stream.getReader();
      await reader.read();
      await reader.cancel();
    }
    await new Promise((r) => setTimeout(r, 50));
    expect(open()).toBeLessThanOrEqual(before + 1);
  });

  it("writes through a temporary file and leaves none behind", async () => {
    await store.put(new Uint8Array(100_000).fill(7));
    expect(readdirSync(path.join(root, ".tmp"))).toEqual([]);
  });
});
