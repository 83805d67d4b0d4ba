/**
 * The file formats Slabwright reads and writes, in one place. Everything that lists formats (the
 * upload zone's picker, the refusal messages, the API's schema and OpenAPI text, the download routes,
 * the plates table) reads it from here. What a format needs beyond this table is typed by its keys:
 * a new import format does not compile until `READERS` in import.ts has its reader; a new export
 * format until `WRITERS` in build-plate.ts has its writer. Pure data and byte tests: safe for the web
 * process and the browser.
 */
/** A binary STL: an 80-byte header, a triangle count n, then exactly 50·n bytes. */
export function isBinaryStl(bytes: Uint8Array): boolean {
  if (bytes.byteLength < 84) return false;
  const n = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength).getUint32(80, true);
  return bytes.byteLength === 84 + 50 * n;
}

export function looksLikeAsciiStl(bytes: Uint8Array): boolean {
  const head = new TextDecoder("latin1")
    .decode(bytes.subarray(0, Math.min(bytes.byteLength, 512)))
    .trimStart()
    .toLowerCase();
  if (!head.startsWith("solid")) return false;
  // A binary file whose header begins with "solid" has control bytes soon after.
  for (let i = 0; i < Math.min(bytes.byteLength, 512); i++) {
    const c = bytes[i]!;
    if (c < 9 || (c > 13 && c < 32)) return false;
  }
  return true;
}

const isZip = (b: Uint8Array) => b.byteLength >= 4 && b[0] === 0x50 && b[1] === 0x4b && b[2] === 0x03 && b[3] === 0x04;
const latin1Head = (b: Uint8Array) => new TextDecoder("latin1").decode(b.subarray(0, Math.min(b.byteLength, 4096)));

type ImportFormatSpec = {
  /** How people name it in the refusal "Slabwright reads …". */
  label: string;
  extensions: readonly string[];
  /** Media types a browser or client may send it as. */
  mime: readonly string[];
  /** The whole file (or its first 4 kB and its size, for a stream stored before it is read) is this format. */
  sniff: (head: Uint8Array, size: number) => boolean;
};

/** Formats read, in the order their byte tests are tried (3MF's zip signature before STL's shapes). */
export const IMPORT_FORMATS = {
  // 3MF Core Specification 1.3, §2 (an OPC zip package): a local file header "PK\3\4" first.
  "3mf": { label: "3MF", extensions: [".3mf"], mime: ["model/3mf"], sniff: (head) => isZip(head) },
  // Binary STL is 84 + 50·n bytes with n at byte 80; ASCII STL opens with `solid` and holds `facet`.
  stl: {
    label: "STL (binary or ASCII)",
    extensions: [".stl"],
    mime: ["model/stl"],
    sniff: (head, size) =>
      (head.byteLength === size
        ? isBinaryStl(head)
        : head.byteLength >= 84 && size === 84 + 50 * new DataView(head.buffer, head.byteOffset, head.byteLength).getUint32(80, true)) ||
      looksLikeAsciiStl(head),
  },
  // Wavefront OBJ: text with `v x y z` vertex lines.
  obj: { label: "OBJ", extensions: [".obj"], mime: ["model/obj"], sniff: (head) => /^\s*v\s/m.test(latin1Head(head)) },
} as const satisfies Record<string, ImportFormatSpec>;

export type ImportFormatId = keyof typeof IMPORT_FORMATS;
export const IMPORT_FORMAT_IDS = Object.keys(IMPORT_FORMATS) as ImportFormatId[];

/** The labels for "Slabwright reads STL (binary or ASCII), 3MF, OBJ" (in the order people expect). */
export const ACCEPTED_FORMATS = (["stl", "3mf", "obj"] as const satisfies readonly ImportFormatId[]).map((f) => IMPORT_FORMATS[f].label);

/** A file input's `accept`: every extension and media type we read. */
export const ACCEPT_ATTRIBUTE = IMPORT_FORMAT_IDS.flatMap((f) => [...IMPORT_FORMATS[f].extensions, ...IMPORT_FORMATS[f].mime]).join(",");

/** The format a file's first bytes (and its size) show, or null. */
export function sniffImportFormat(head: Uint8Array, size: number): ImportFormatId | null {
  for (const id of IMPORT_FORMAT_IDS) if (IMPORT_FORMATS[id].sniff(head, size)) return id;
  return null;
}

/** The format a file name's extension says, or null. */
export function importFormatByName(fileName: string): ImportFormatId | null {
  const lower = fileName.toLowerCase();
  return IMPORT_FORMAT_IDS.find((f) => IMPORT_FORMATS[f].extensions.some((e) => lower.endsWith(e))) ?? null;
}

/** A file name without the extension of a format we read. */
export function stripImportExtension(fileName: string): string {
  const f = importFormatByName(fileName);
  return f
    ? fileName.slice(0, fileName.length - IMPORT_FORMATS[f].extensions.find((e) => fileName.toLowerCase().endsWith(e))!.length)
    : fileName;
}

type ExportFormatSpec = { label: string; extension: string; mime: string };

/** Formats a plate is written in; the first is what the API answers when no format is asked for. */
export const EXPORT_FORMATS = {
  // 3MF Core Specification 1.3, Appendix: media type model/3mf (IANA registration).
  "3mf": { label: "3MF", extension: ".3mf", mime: "model/3mf" },
  // IANA media type model/stl (registered 2018).
  stl: { label: "STL", extension: ".stl", mime: "model/stl" },
} as const satisfies Record<string, ExportFormatSpec>;

export type ExportFormatId = keyof typeof EXPORT_FORMATS;
export const EXPORT_FORMAT_IDS = Object.keys(EXPORT_FORMATS) as ExportFormatId[];
export const DEFAULT_EXPORT_FORMAT: ExportFormatId = EXPORT_FORMAT_IDS[0]!;

export function isExportFormat(v: string): v is ExportFormatId {
  return (EXPORT_FORMAT_IDS as string[]).includes(v);
}
