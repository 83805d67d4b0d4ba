import { Inflate } from "fflate";
import { MeshImportError } from "../errors";

/**
 * A small ZIP reader for 3MF packages (APPNOTE.TXT, PKWARE): central directory first, then only the
 * entries asked for are inflated, in chunks, counting every byte they produce so an archive that
 * would inflate past the limit is refused without being inflated ("zip bomb").
 */
export type ZipEntry = { name: string; method: number; compressedSize: number; size: number; dataStart: number };

export type ZipLimits = { maxInflatedBytes: number };

export function readZipDirectory(bytes: Uint8Array, file: string, limits: ZipLimits): Map<string, ZipEntry> {
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const len = bytes.byteLength;
  let eocd = -1;
  for (let i = len - 22; i >= Math.max(0, len - 22 - 0xffff); i--) {
    if (view.getUint32(i, true) === 0x06054b50) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) throw new MeshImportError("truncated", file, "the 3MF package is cut short (no ZIP end record)");
  const count = view.getUint16(eocd + 10, true);
  const cdSize = view.getUint32(eocd + 12, true);
  const cdOffset = view.getUint32(eocd + 16, true);
  if (count === 0xffff || cdOffset === 0xffffffff || cdSize === 0xffffffff) {
    throw new MeshImportError(
      "unsupported_archive",
      file,
      "the 3MF package uses ZIP64, which is only needed past 4 GB; that is over our limits anyway",
    );
  }
  if (cdOffset + cdSize > eocd) throw new MeshImportError("truncated", file, "the 3MF package's directory points past its end");
  const entries = new Map<string, ZipEntry>();
  let declared = 0;
  let p = cdOffset;
  for (let i = 0; i < count; i++) {
    if (p + 46 > len || view.getUint32(p, true) !== 0x02014b50)
      throw new MeshImportError("truncated", file, "the 3MF package's directory is damaged");
    const flags = view.getUint16(p + 8, true);
    const method = view.getUint16(p + 10, true);
    const compressedSize = view.getUint32(p + 20, true);
    const size = view.getUint32(p + 24, true);
    const nameLen = view.getUint16(p + 28, true);
    const extraLen = view.getUint16(p + 30, true);
    const commentLen = view.getUint16(p + 32, true);
    const local = view.getUint32(p + 42, true);
    const name = new TextDecoder().decode(bytes.subarray(p + 46, p + 46 + nameLen));
    p += 46 + nameLen + extraLen + commentLen;
    if (flags & 1) throw new MeshImportError("unsupported_archive", file, `the entry ${name} is encrypted`);
    declared += size;
    if (declared > limits.maxInflatedBytes) throw archiveTooLarge(file, limits.maxInflatedBytes, "its directory declares");
    if (local + 30 > len || view.getUint32(local, true) !== 0x04034b50)
      throw new MeshImportError("truncated", file, `the entry ${name} is missing from the package`);
    const dataStart = local + 30 + view.getUint16(local + 26, true) + view.getUint16(local + 28, true);
    if (dataStart + compressedSize > len) throw new MeshImportError("truncated", file, `the entry ${name} is cut short`);
    // OPC part names are case-insensitive; keep a leading-slash-free, lower-case key.
    entries.set(name.replace(/^\//, "").toLowerCase(), { name, method, compressedSize, size, dataStart });
  }
  return entries;
}

/** Inflate one entry, refusing it the moment its output passes `budget` bytes. */
export function inflateEntry(bytes: Uint8Array, entry: ZipEntry, file: string, budget: number, packageLimit = budget): Uint8Array {
  const chunks: Uint8Array[] = [];
  const produced = inflateEntryTo(bytes, entry, file, budget, (c) => chunks.push(c), packageLimit);
  if (chunks.length === 1) return chunks[0]!;
  const out = new Uint8Array(produced);
  let o = 0;
  for (const c of chunks) {
    out.set(c, o);
    o += c.byteLength;
  }
  return out;
}

/**
 * Inflate one entry into `sink` chunk by chunk (16 kB of input at a time, so one step yields at most
 * ~16 MB even at deflate's best ratio of about 1 032 : 1), refusing it the moment its
 * output passes `budget` bytes; what the sink throws (a parser's refusal) stops the inflating too.
 * Returns the bytes produced. `packageLimit` is the limit named in the refusal (the budget is what is
 * left of it after the entries read before).
 */
export function inflateEntryTo(
  bytes: Uint8Array,
  entry: ZipEntry,
  file: string,
  budget: number,
  sink: (chunk: Uint8Array) => void,
  packageLimit = budget,
): number {
  const data = bytes.subarray(entry.dataStart, entry.dataStart + entry.compressedSize);
  if (entry.method === 0) {
    if (data.byteLength > budget) throw archiveTooLarge(file, packageLimit, "the package holds");
    sink(data);
    return data.byteLength;
  }
  if (entry.method !== 8)
    throw new MeshImportError(
      "unsupported_archive",
      file,
      `the entry ${entry.name} uses ZIP compression method ${entry.method}; only stored and deflated entries are read`,
    );
  let produced = 0;
  let over = false;
  const inflater = new Inflate((chunk) => {
    if (over) return;
    produced += chunk.byteLength;
    if (produced > budget) over = true;
    else sink(chunk);
  });
  const step = 1 << 14;
  try {
    for (let i = 0; i < data.byteLength && !over; i += step) {
      inflater.push(data.subarray(i, Math.min(i + step, data.byteLength)), i + step >= data.byteLength);
    }
  } catch (err) {
    if (err instanceof MeshImportError) throw err;
    throw new MeshImportError("malformed", file, `the entry ${entry.name} is not valid deflate data`);
  }
  if (over) throw archiveTooLarge(file, packageLimit, "it would inflate to");
  return produced;
}

function archiveTooLarge(file: string, limit: number, how: string) {
  return new MeshImportError(
    "archive_too_large",
    file,
    `${how} more than ${(limit / 1e6).toLocaleString("en-US")} MB of content, past the limit for one package`,
    { limit },
  );
}
