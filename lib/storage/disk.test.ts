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

  it("writes through a temporary file and leaves none behind", async () => {
    await store.put(new Uint8Array(100_000).fill(7));
    expect(readdirSync(path.join(root, ".tmp"))).toEqual([]);
  });
});
