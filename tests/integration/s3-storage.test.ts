import { mkdtempSync, rmSync } from "node:fs";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import path from "node:path";
import S3rver from "s3rver";
import { afterAll, beforeAll, describe } from "vitest";
import { S3BlobStore } from "@/lib/storage/s3";
import { blobStoreContract } from "../support/blob-store-contract";

// A local fake S3 (npm s3rver) on loopback stands in for the hosted service.
const dir = mkdtempSync(path.join(tmpdir(), "slab-s3-"));
let server: S3rver;
let store: S3BlobStore;

beforeAll(async () => {
  server = new S3rver({ port: 0, address: "127.0.0.1", silent: true, directory: dir, configureBuckets: [{ name: "slab-test" }] });
  const addr = (await server.run()) as AddressInfo;
  store = new S3BlobStore({
    endpoint: `http://127.0.0.1:${addr.port}`,
    region: "us-east-1",
    bucket: "slab-test",
    accessKeyId: "S3RVER", // s3rver's documented default credentials
    secretAccessKey: "S3RVER",
  });
});

afterAll(async () => {
  store?.destroy();
  await server?.close();
  rmSync(dir, { recursive: true, force: true });
});

describe("S3 blob store against a local fake S3", () => {
  blobStoreContract(() => store);
});
