import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from "@aws-sdk/client-s3";
import { createReadStream, promises as fs } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { sha256Hex } from "./hash";
import { spool } from "./spool";
import { assertKey, BlobNotFoundError, type BlobStore, type StoredBlob } from "./types";

export type S3StoreConfig = {
  endpoint?: string;
  region: string;
  bucket: string;
  accessKeyId?: string;
  secretAccessKey?: string;
};

/** Blobs in an S3-compatible bucket under blobs/<key>. A PutObject is atomic: readers see all or nothing. */
export class S3BlobStore implements BlobStore {
  readonly kind = "s3" as const;
  private readonly client: S3Client;

  constructor(private readonly config: S3StoreConfig) {
    this.client = new S3Client({
      region: config.region,
      endpoint: config.endpoint,
      // Self-hosted S3-compatible servers rarely have per-bucket host names.
      forcePathStyle: Boolean(config.endpoint),
      credentials:
        config.accessKeyId && config.secretAccessKey
          ? { accessKeyId: config.accessKeyId, secretAccessKey: config.secretAccessKey }
          : undefined,
      // Newer SDKs add streaming checksums by default, which many compatible servers do not accept.
      requestChecksumCalculation: "WHEN_REQUIRED",
      responseChecksumValidation: "WHEN_REQUIRED",
    });
  }

  private objectKey(key: string): string {
    return `blobs/${assertKey(key)}`;
  }

  async put(bytes: Uint8Array): Promise<StoredBlob> {
    const key = sha256Hex(bytes);
    if (await this.has(key)) return { key, size: bytes.byteLength, created: false };
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.config.bucket,
        Key: this.objectKey(key),
        Body: bytes,
        ContentLength: bytes.byteLength,
        ContentType: "application/octet-stream",
      }),
    );
    return { key, size: bytes.byteLength, created: true };
  }

  /**
   * The key is the content's digest, known only at the end, so the stream is spooled to a local
   * temporary file while it is hashed, then that file is sent as the PutObject body (a stream with
   * its length): memory holds one chunk at a time either way.
   */
  async putStream(source: AsyncIterable<Uint8Array>, opts: { maxBytes?: number } = {}): Promise<StoredBlob> {
    const tmp = await spool(source, path.join(tmpdir(), "slabwright-spool"), opts.maxBytes);
    try {
      if (await this.has(tmp.key)) return { key: tmp.key, size: tmp.size, created: false };
      await this.client.send(
        new PutObjectCommand({
          Bucket: this.config.bucket,
          Key: this.objectKey(tmp.key),
          Body: createReadStream(tmp.file),
          ContentLength: tmp.size,
          ContentType: "application/octet-stream",
        }),
      );
      return { key: tmp.key, size: tmp.size, created: true };
    } finally {
      await fs.rm(tmp.file, { force: true });
    }
  }

  async get(key: string): Promise<Uint8Array> {
    try {
      const out = await this.client.send(new GetObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
      if (!out.Body) throw new BlobNotFoundError(key);
      return await out.Body.transformToByteArray();
    } catch (err) {
      if (isNotFound(err)) throw new BlobNotFoundError(key);
      throw err;
    }
  }

  async open(key: string): Promise<{ size: number; stream: ReadableStream<Uint8Array> }> {
    try {
      const out = await this.client.send(new GetObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
      if (!out.Body) throw new BlobNotFoundError(key);
      return { size: Number(out.ContentLength ?? 0), stream: out.Body.transformToWebStream() as ReadableStream<Uint8Array> };
    } catch (err) {
      if (isNotFound(err)) throw new BlobNotFoundError(key);
      throw err;
    }
  }

  async has(key: string): Promise<boolean> {
    try {
      await this.client.send(new HeadObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
      return true;
    } catch (err) {
      if (isNotFound(err)) return false;
      throw err;
    }
  }

  async delete(key: string): Promise<void> {
    await this.client.send(new DeleteObjectCommand({ Bucket: this.config.bucket, Key: this.objectKey(key) }));
  }

  destroy(): void {
    this.client.destroy();
  }
}

function isNotFound(err: unknown): boolean {
  if (err instanceof S3ServiceException) {
    return err.$metadata.httpStatusCode === 404 || err.name === "NoSuchKey" || err.name === "NotFound";
  }
  return false;
}
