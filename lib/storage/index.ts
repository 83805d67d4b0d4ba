import path from "node:path";
import { env } from "@/lib/env";
import { DiskBlobStore } from "./disk";
import { S3BlobStore } from "./s3";
import type { BlobStore } from "./types";

export * from "./types";
export { DiskBlobStore } from "./disk";
export { S3BlobStore } from "./s3";

let store: BlobStore | undefined;

/** The store chosen by the environment: local disk by default, S3 when STORAGE_DRIVER=s3. */
export function blobStore(): BlobStore {
  if (store) return store;
  const e = env();
  if (e.STORAGE_DRIVER === "s3") {
    if (!e.S3_BUCKET) throw new Error("STORAGE_DRIVER=s3 needs S3_BUCKET");
    store = new S3BlobStore({
      endpoint: e.S3_ENDPOINT,
      region: e.S3_REGION,
      bucket: e.S3_BUCKET,
      accessKeyId: e.S3_ACCESS_KEY_ID,
      secretAccessKey: e.S3_SECRET_ACCESS_KEY,
    });
  } else {
    store = new DiskBlobStore(path.resolve(e.STORAGE_DIR));
  }
  return store;
}
