/** Where uploaded meshes and generated plate files are kept. Keys are SHA-256 hex of the content. */
export interface BlobStore {
  readonly kind: "disk" | "s3";
  /** Store bytes; storing the same content twice is a no-op that returns the same key. */
  put(bytes: Uint8Array): Promise<StoredBlob>;
  /**
   * Store a stream's bytes, hashing them as they arrive and never holding them all in memory (disk:
   * a temporary file renamed into place; S3: the spooled file uploaded as a stream). Past `maxBytes`
   * it stops reading and throws BlobTooLargeError; nothing is stored then.
   */
  putStream(source: AsyncIterable<Uint8Array>, opts?: { maxBytes?: number }): Promise<StoredBlob>;
  get(key: string): Promise<Uint8Array>;
  /**
   * A blob to send on as it is read (disk: a file stream; S3: the object's body), never held whole in
   * memory; the stream closes the file or connection when it ends or is cancelled (a client that goes
   * away). A missing blob throws BlobNotFoundError here, before any byte, so a route can answer 404.
   */
  open(key: string): Promise<{ size: number; stream: ReadableStream<Uint8Array> }>;
  has(key: string): Promise<boolean>;
  /** Remove a blob; removing a missing one is not an error. */
  delete(key: string): Promise<void>;
}

export type StoredBlob = { key: string; size: number; created: boolean };

export class BlobNotFoundError extends Error {
  readonly code = "blob_not_found";
  constructor(readonly key: string) {
    super(`No stored file with key ${key}`);
    this.name = "BlobNotFoundError";
  }
}

export class BlobTooLargeError extends Error {
  readonly code = "blob_too_large";
  constructor(readonly limit: number) {
    super(`The content is larger than the ${limit}-byte limit`);
    this.name = "BlobTooLargeError";
  }
}

export class BadBlobKeyError extends Error {
  readonly code = "bad_blob_key";
  constructor(key: string) {
    super(`Not a content key: ${JSON.stringify(key.slice(0, 80))}`);
    this.name = "BadBlobKeyError";
  }
}

const KEY = /^[0-9a-f]{64}$/;

/** A key is only ever a SHA-256 hex digest, so nothing a user sends can become a path or an object name. */
export function assertKey(key: string): string {
  if (!KEY.test(key)) throw new BadBlobKeyError(key);
  return key;
}
