import { inflateSync, unzipSync } from "fflate";

/**
 * The proof's own 3MF reader: enough of the 3MF Core Specification (1.4.0) to count what a build
 * holds — the package's start part found through `_rels/.rels` (OPC relationship of type
 * …/2013/01/3dmodel), the model's unit, mesh objects (vertices, triangles), components objects and
 * build items with their 3×4 transforms. It shares no code with the engine's reader and scans the XML
 * bytes directly (a plate's model runs to tens of megabytes, so no DOM and no per-element strings for
 * vertices and triangles). Elements in other namespaces (prefixed) are skipped, as the core
 * specification allows a consumer to do for extensions it does not know.
 */
export const NS_CORE = "http://schemas.microsoft.com/3dmanufacturing/core/2015/02";
const REL_MODEL = "http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel";
/** 3MF core §3.4.1: the model's unit attribute, millimetre by default. */
const UNIT_MM: Record<string, number> = { micron: 0.001, millimeter: 1, centimeter: 10, inch: 25.4, foot: 304.8, meter: 1000 };

export type ThreeMfBody = {
  objectId: string;
  name: string;
  triangles: number;
  min: [number, number, number];
  max: [number, number, number];
};
/**
 * One connected shell of a placed mesh (triangles that share a vertex index), in millimetres: a mesh
 * object may hold several (a part made of several bodies, a hollow part's outer and inner shell).
 * `volume` is signed: an inside-out shell (a void) counts negative.
 */
export type ThreeMfShell = {
  objectId: string;
  triangles: number;
  min: [number, number, number];
  max: [number, number, number];
  volume: number;
};
export type ThreeMfRead = { unit: string; bodies: ThreeMfBody[]; shells: ThreeMfShell[]; problems: string[] };

export class ThreeMfProofError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "ThreeMfProofError";
  }
}

type Attr = { name: string; start: number; end: number };
type Tag = { name: string; attrs: Attr[]; selfClosing: boolean; closing: boolean };

const latin1 = new TextDecoder("latin1");
const utf8 = new TextDecoder("utf-8");

/**
 * A small forward scanner over XML bytes: the tag that starts at `i` (a `<`), with its attributes as
 * byte ranges, and where the scan goes on. Comments, processing instructions and CDATA are skipped
 * (tag null).
 */
function tagAt(b: Uint8Array, i: number): { tag: Tag | null; next: number } {
  const n = b.length;
  const c = b[i + 1];
  if (c === 63 /* ? */) return { tag: null, next: find(b, "?>", i + 2) + 2 };
  if (c === 33 /* ! */) {
    if (b[i + 2] === 45 && b[i + 3] === 45) return { tag: null, next: find(b, "-->", i + 4) + 3 };
    if (b[i + 2] === 91 /* [ */) return { tag: null, next: find(b, "]]>", i + 3) + 3 };
    return { tag: null, next: find(b, ">", i + 2) + 1 };
  }
  const closing = c === 47; /* / */
  let j = closing ? i + 2 : i + 1;
  const nameStart = j;
  while (j < n && !isSpace(b[j]!) && b[j] !== 62 && b[j] !== 47) j++;
  const name = latin1.decode(b.subarray(nameStart, j));
  const attrs: Attr[] = [];
  let selfClosing = false;
  for (;;) {
    while (j < n && isSpace(b[j]!)) j++;
    if (j >= n) throw new ThreeMfProofError(`The model ends inside the <${name}> tag.`);
    if (b[j] === 62) {
      j++;
      break;
    }
    if (b[j] === 47 && b[j + 1] === 62) {
      selfClosing = true;
      j += 2;
      break;
    }
    const an = j;
    while (j < n && b[j] !== 61 /* = */ && !isSpace(b[j]!)) j++;
    const attrName = latin1.decode(b.subarray(an, j));
    while (j < n && isSpace(b[j]!)) j++;
    if (b[j] !== 61) throw new ThreeMfProofError(`Attribute ${attrName} of <${name}> has no value.`);
    j++;
    while (j < n && isSpace(b[j]!)) j++;
    const q = b[j];
    if (q !== 34 && q !== 39) throw new ThreeMfProofError(`Attribute ${attrName} of <${name}> is not quoted.`);
    const vs = j + 1;
    j = vs;
    while (j < n && b[j] !== q) j++;
    attrs.push({ name: attrName, start: vs, end: j });
    j++;
  }
  return { tag: { name, attrs, selfClosing, closing }, next: j };
}

function* tags(b: Uint8Array): Generator<Tag> {
  for (let i = b.indexOf(60); i >= 0 && i < b.length; i = b.indexOf(60, i)) {
    const { tag, next } = tagAt(b, i);
    i = next;
    if (tag) yield tag;
  }
}

/**
 * The hot elements (`<vertex x= y= z=/>`, `<triangle v1= v2= v3=/>`) read in place: their number
 * attributes into `out` (by the attribute name's last byte: x y z, or 1 2 3), nothing allocated.
 * Returns where the scan goes on.
 */
function numbersAt(b: Uint8Array, j: number, out: Float64Array): number {
  const n = b.length;
  out[0] = out[1] = out[2] = NaN;
  for (;;) {
    while (j < n && isSpace(b[j]!)) j++;
    if (j >= n) throw new ThreeMfProofError("The model ends inside a <vertex> or <triangle> tag.");
    if (b[j] === 62) return j + 1;
    if (b[j] === 47 && b[j + 1] === 62) return j + 2;
    const an = j;
    while (j < n && b[j] !== 61 && !isSpace(b[j]!)) j++;
    const last = b[j - 1]!;
    const len = j - an;
    while (j < n && b[j] !== 34 && b[j] !== 39) j++;
    const q = b[j]!;
    const vs = ++j;
    while (j < n && b[j] !== q) j++;
    const slot = len === 1 ? last - 120 /* x */ : len === 2 && b[an] === 118 /* v */ ? last - 49 /* 1 */ : -1;
    if (slot >= 0 && slot < 3) out[slot] = num(b, vs, j);
    j++;
  }
}

const isSpace = (c: number) => c === 32 || c === 9 || c === 10 || c === 13;

function find(b: Uint8Array, s: string, from: number): number {
  const first = s.charCodeAt(0);
  for (let i = from; i <= b.length - s.length; i++) {
    if (b[i] !== first) continue;
    let k = 1;
    while (k < s.length && b[i + k] === s.charCodeAt(k)) k++;
    if (k === s.length) return i;
  }
  return b.length;
}

const ENTITIES: Record<string, string> = { amp: "&", lt: "<", gt: ">", quot: '"', apos: "'" };
function text(b: Uint8Array, a: Attr): string {
  return utf8
    .decode(b.subarray(a.start, a.end))
    .replace(/&(#x[0-9a-f]+|#\d+|[a-z]+);/gi, (whole, e: string) =>
      e[0] === "#"
        ? String.fromCodePoint(e[1] === "x" || e[1] === "X" ? parseInt(e.slice(2), 16) : Number(e.slice(1)))
        : (ENTITIES[e] ?? whole),
    );
}

/** A decimal number (ST_Number: optional sign, digits, fraction, exponent) from bytes; NaN if malformed. */
function num(b: Uint8Array, start: number, end: number): number {
  let i = start;
  let sign = 1;
  if (b[i] === 45) {
    sign = -1;
    i++;
  } else if (b[i] === 43) i++;
  let mant = 0,
    digits = 0,
    scale = 0;
  while (i < end && b[i]! >= 48 && b[i]! <= 57) {
    mant = mant * 10 + (b[i]! - 48);
    i++;
    digits++;
  }
  if (b[i] === 46) {
    i++;
    while (i < end && b[i]! >= 48 && b[i]! <= 57) {
      mant = mant * 10 + (b[i]! - 48);
      i++;
      scale--;
      digits++;
    }
  }
  if (digits === 0) return NaN;
  if (b[i] === 101 || b[i] === 69) {
    i++;
    let es = 1,
      e = 0,
      ed = 0;
    if (b[i] === 45) {
      es = -1;
      i++;
    } else if (b[i] === 43) i++;
    while (i < end && b[i]! >= 48 && b[i]! <= 57) {
      e = e * 10 + (b[i]! - 48);
      i++;
      ed++;
    }
    if (ed === 0) return NaN;
    scale += es * e;
  }
  if (i !== end) return NaN;
  return sign * (scale < 0 ? mant / 10 ** -scale : mant * 10 ** scale);
}

type Matrix = number[]; // m00 m01 m02 m10 m11 m12 m20 m21 m22 m30 m31 m32
const IDENTITY: Matrix = [1, 0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0];
/** a then b, for row vectors (3MF core §3.3: a point is [x y z 1] times the matrix). */
function compose(a: Matrix, b: Matrix): Matrix {
  const m = (r: number, c: number, x: Matrix) => x[r * 3 + c]!;
  const out: number[] = [];
  for (let r = 0; r < 4; r++) {
    for (let c = 0; c < 3; c++) {
      let s = r === 3 ? m(3, c, b) : 0;
      for (let k = 0; k < 3; k++) s += m(r, k, a) * m(k, c, b);
      out.push(s);
    }
  }
  return out;
}

type MeshObject = {
  id: string;
  name: string;
  verts: Float64Array;
  nv: number;
  triangles: number;
  /** Vertex indices of the well-formed triangles, three each. */
  tris: Uint32Array;
  nt: number;
  /** After the mesh closes: each vertex's shell, and per shell its triangles and signed local volume. */
  shellOf?: Int32Array;
  shells?: { triangles: number; volume: number }[];
};
type ComponentsObject = { id: string; name: string; components: { objectId: string; transform: Matrix }[] };

/**
 * Raw DEFLATE (RFC 1951) decoder, e.g. node:zlib's `inflateRawSync`, faster than fflate's on big
 * models. `size` is what the zip directory says the entry expands to: a hint for the output buffer,
 * never trusted (the result's length is checked against it).
 */
export type InflateRaw = (data: Uint8Array, size?: number) => Uint8Array;

/** An entry as the zip's central directory lists it (PKWARE APPNOTE.TXT §4.3.12). */
type ZipEntryRef = { method: number; compressed: number; size: number; offset: number };

/**
 * The central directory of a zip package, read in place (APPNOTE §4.3.16 end record, §4.3.12 file
 * headers). Null for what this small reader leaves to fflate: ZIP64, split archives, encryption.
 */
function zipDirectory(bytes: Uint8Array): Map<string, ZipEntryRef> | null {
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let end = -1;
  for (let i = bytes.length - 22; i >= Math.max(0, bytes.length - 22 - 0xffff); i--) {
    if (v.getUint32(i, true) === 0x06054b50) {
      end = i;
      break;
    }
  }
  if (end < 0) return null;
  const count = v.getUint16(end + 10, true);
  let at = v.getUint32(end + 16, true);
  if (v.getUint16(end + 4, true) !== 0 || count === 0xffff || at === 0xffffffff) return null;
  const out = new Map<string, ZipEntryRef>();
  for (let k = 0; k < count; k++) {
    if (at + 46 > bytes.length || v.getUint32(at, true) !== 0x02014b50) return null;
    const flags = v.getUint16(at + 8, true);
    const method = v.getUint16(at + 10, true);
    const compressed = v.getUint32(at + 20, true),
      size = v.getUint32(at + 24, true);
    const nameLen = v.getUint16(at + 28, true),
      extraLen = v.getUint16(at + 30, true),
      commentLen = v.getUint16(at + 32, true);
    const offset = v.getUint32(at + 42, true);
    if (flags & 1 || compressed === 0xffffffff || size === 0xffffffff || offset === 0xffffffff) return null;
    const name = (flags & 0x800 ? utf8 : latin1).decode(bytes.subarray(at + 46, at + 46 + nameLen));
    out.set(name, { method, compressed, size, offset });
    at += 46 + nameLen + extraLen + commentLen;
  }
  return out;
}

/** Raw DEFLATE off the calling thread, e.g. node:zlib's `inflateRaw` (its thread pool); `size` as for InflateRaw. */
export type InflateRawAsync = (data: Uint8Array, size?: number) => Promise<Uint8Array>;

/** An entry's stored bytes, found through the central directory, and what they expand to. */
type StoredEntry = { name: string; data: Uint8Array; method: number; size: number; compressed: number };

function storedEntry(bytes: Uint8Array, e: ZipEntryRef, name: string): StoredEntry {
  const v = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  if (e.offset + 30 > bytes.length || v.getUint32(e.offset, true) !== 0x04034b50) throw new Error(`no local header for ${name}`);
  const from = e.offset + 30 + v.getUint16(e.offset + 26, true) + v.getUint16(e.offset + 28, true);
  if (from + e.compressed > bytes.length) throw new Error(`${name} runs past the end of the package`);
  if (e.method !== 0 && e.method !== 8) throw new Error(`${name} uses compression method ${e.method}`);
  return { name, data: bytes.subarray(from, from + e.compressed), method: e.method, size: e.size, compressed: e.compressed };
}

/**
 * The size to allocate by: DEFLATE expands at most 1032 : 1 (zlib's technical notes: a 258-byte match
 * in about 2 bits), so a size past that, or past 1 GiB, is no hint.
 */
const sizeHint = (e: StoredEntry) => (e.size <= Math.min(1032 * e.compressed + 1024, 2 ** 30) ? e.size : undefined);

function expanded(e: StoredEntry, out: Uint8Array): Uint8Array {
  if (out.length !== e.size) throw new Error(`${e.name} expands to ${out.length} bytes where the directory says ${e.size}`);
  return out;
}

const notZip = (err: unknown) =>
  new ThreeMfProofError(`The 3MF is not a readable zip package (${err instanceof Error ? err.message : String(err)}).`);

/**
 * Entries of a zip package by name: found through the central directory and expanded straight from
 * the package's bytes (by `inflateRaw` when given, else by fflate); a package this reader leaves
 * alone is read by fflate's unzip.
 */
function unzipEntry(
  bytes: Uint8Array,
  dir: Map<string, ZipEntryRef> | null,
  name: string,
  inflateRaw?: InflateRaw,
): Uint8Array | undefined {
  try {
    if (!dir) return unzipSync(bytes, { filter: (f) => f.name === name })[name];
    const ref = dir.get(name);
    if (!ref) return undefined;
    const e = storedEntry(bytes, ref, name);
    if (e.method === 0) return expanded(e, e.data);
    return expanded(e, inflateRaw ? inflateRaw(e.data, sizeHint(e)) : inflateSync(e.data));
  } catch (err) {
    throw notZip(err);
  }
}

function directoryOf(bytes: Uint8Array): Map<string, ZipEntryRef> | null {
  try {
    return zipDirectory(bytes);
  } catch {
    return null; // a directory that runs past the bytes: left to fflate, which says what is wrong
  }
}

/** The model part the package's relationships name (OPC: `_rels/.rels`, type …/3dmodel). */
function modelTarget(bytes: Uint8Array, dir: Map<string, ZipEntryRef> | null, inflateRaw?: InflateRaw): string {
  const rels = unzipEntry(bytes, dir, "_rels/.rels", inflateRaw);
  if (!rels) throw new ThreeMfProofError("The 3MF has no _rels/.rels part (OPC requires it to name the model).");
  let target: string | undefined;
  for (const t of tags(rels)) {
    if (t.name !== "Relationship" || t.closing) continue;
    const type = t.attrs.find((a) => a.name === "Type");
    const tg = t.attrs.find((a) => a.name === "Target");
    if (type && tg && text(rels, type) === REL_MODEL) target = text(rels, tg).replace(/^\//, "");
  }
  if (!target) throw new ThreeMfProofError("The 3MF's relationships name no 3D model part.");
  return target;
}
const noModel = (target: string) => new ThreeMfProofError(`The 3MF names ${target} as its model, but the package has no such part.`);

/** Read the build of a 3MF package: every mesh it places, with its triangle count and bounds (mm). */
export function readThreeMfBodies(bytes: Uint8Array, inflateRaw?: InflateRaw): ThreeMfRead {
  const dir = directoryOf(bytes);
  const target = modelTarget(bytes, dir, inflateRaw);
  const model = unzipEntry(bytes, dir, target, inflateRaw);
  if (!model) throw noModel(target);
  return readModel(model);
}

/**
 * As readThreeMfBodies, the model part (tens of megabytes of XML) expanded by `inflateRawAsync` while
 * the caller goes on with other work; the small parts and the reading stay on the calling thread.
 * Rejects with ThreeMfProofError as readThreeMfBodies throws.
 */
export function readThreeMfBodiesAsync(bytes: Uint8Array, inflateRawAsync: InflateRawAsync, inflateRaw?: InflateRaw): Promise<ThreeMfRead> {
  try {
    const dir = directoryOf(bytes);
    const target = modelTarget(bytes, dir, inflateRaw);
    const ref = dir?.get(target);
    if (!dir || !ref) return Promise.resolve(readThreeMfBodies(bytes, inflateRaw));
    let e: StoredEntry;
    try {
      e = storedEntry(bytes, ref, target);
    } catch (err) {
      throw notZip(err);
    }
    if (e.method === 0) return Promise.resolve(readModel(expandedOr(e, e.data)));
    return inflateRawAsync(e.data, sizeHint(e)).then(
      (out) => readModel(expandedOr(e, out)),
      (err: unknown) => {
        throw notZip(err);
      },
    );
  } catch (err) {
    return Promise.reject(err);
  }
}
function expandedOr(e: StoredEntry, out: Uint8Array): Uint8Array {
  try {
    return expanded(e, out);
  } catch (err) {
    throw notZip(err);
  }
}

export function readModel(b: Uint8Array): ThreeMfRead {
  const problems: string[] = [];
  const meshes = new Map<string, MeshObject>();
  const groups = new Map<string, ComponentsObject>();
  const items: { objectId: string; transform: Matrix }[] = [];
  let unit = "millimeter";
  let seenModel = false;
  let object: { id: string; name: string } | null = null;
  // The mesh being read (filled by the runs of hot elements).
  let run: MeshRun | null = null;
  let group: ComponentsObject | null = null;
  let inBuild = false;
  const attr = (t: Tag, n: string) => t.attrs.find((a) => a.name === n);
  const matrix = (t: Tag): Matrix => {
    const a = attr(t, "transform");
    if (!a) return IDENTITY;
    const m = text(b, a).trim().split(/\s+/).map(Number);
    if (m.length !== 12 || m.some((x) => !Number.isFinite(x))) {
      problems.push(`A transform "${text(b, a)}" is not 12 numbers (3MF core §3.3).`);
      return IDENTITY;
    }
    return m;
  };
  const n = b.length;
  for (let i = b.indexOf(60); i >= 0 && i < n;) {
    const c1 = b[i + 1];
    if (c1 === 118 && isWord(b, i + 1, VERTEX)) {
      i = vertexRun(b, i, run ?? newRun(), run !== null, problems, object?.id ?? "");
      continue;
    }
    if (c1 === 116 && isWord(b, i + 1, TRIANGLE)) {
      i = triangleRun(b, i, run ?? newRun(), run !== null, problems, object?.id ?? "");
      continue;
    }
    const { tag: t, next } = tagAt(b, i);
    i = b.indexOf(60, next);
    if (!t) continue;
    const nm = t.name;
    if (nm.includes(":")) continue; // another namespace's element
    if (t.closing) {
      if (nm === "object") {
        if (run && object) meshes.set(object.id, withShells({ id: object.id, name: object.name, ...run }));
        if (group) groups.set(group.id, group);
        object = group = run = null;
      } else if (nm === "build") inBuild = false;
      continue;
    }
    switch (nm) {
      case "model": {
        seenModel = true;
        const ns = attr(t, "xmlns");
        if (!ns || text(b, ns) !== NS_CORE) problems.push(`The model is not in the 3MF core namespace (${ns ? text(b, ns) : "none"}).`);
        const u = attr(t, "unit");
        if (u) unit = text(b, u);
        if (!(unit in UNIT_MM)) problems.push(`The model's unit "${unit}" is not one of the 3MF core units.`);
        break;
      }
      case "object": {
        const id = attr(t, "id");
        const n = attr(t, "name");
        object = { id: id ? text(b, id) : "", name: n ? text(b, n) : "" };
        if (!id) problems.push("An object has no id.");
        break;
      }
      case "mesh":
        if (object) run = newRun();
        break;
      case "components":
        if (object) group = { ...object, components: [] };
        break;
      case "component": {
        const id = attr(t, "objectid");
        if (group && id) group.components.push({ objectId: text(b, id), transform: matrix(t) });
        break;
      }
      case "build":
        inBuild = !t.selfClosing;
        break;
      case "item": {
        const id = attr(t, "objectid");
        if (inBuild && id) items.push({ objectId: text(b, id), transform: matrix(t) });
        break;
      }
    }
  }
  if (!seenModel) throw new ThreeMfProofError("The 3MF's model part has no <model> element.");
  const scale = UNIT_MM[unit] ?? 1;
  const bodies: ThreeMfBody[] = [];
  const shells: ThreeMfShell[] = [];
  const place = (id: string, m: Matrix, depth: number) => {
    if (depth > 16) {
      problems.push(`Object ${id}: components nest more than 16 deep (a cycle?).`);
      return;
    }
    const me = meshes.get(id);
    if (me) {
      bodies.push(bodyOf(me, m, scale, shells));
      return;
    }
    const g = groups.get(id);
    if (!g) {
      problems.push(`A build item or component names object ${id}, which the model does not define.`);
      return;
    }
    for (const c of g.components) place(c.objectId, compose(c.transform, m), depth + 1);
  };
  for (const it of items) place(it.objectId, it.transform, 0);
  return { unit, bodies, shells, problems };
}

/** A mesh's vertices, its well-formed triangles (three indices each) and every triangle counted. */
type MeshRun = {
  verts: Float64Array;
  nv: number;
  tris: Uint32Array;
  nt: number;
  triangles: number;
  /** Union-find over the vertices, joined as the triangles are read; `joins` successful unions. */
  parent?: Int32Array;
  joins: number;
  /** Six times the signed volume of all well-formed triangles, summed as they are read. */
  volume6: number;
};

const VERTEX = Uint8Array.from("vertex", (c) => c.charCodeAt(0));
const TRIANGLE = Uint8Array.from("triangle", (c) => c.charCodeAt(0));
/** Does the element name `word` start at `at`, followed by a space? */
function isWord(b: Uint8Array, at: number, word: Uint8Array): boolean {
  for (let k = 1; k < word.length; k++) if (b[at + k] !== word[k]) return false;
  return isSpace(b[at + word.length] ?? 0);
}
/** The next `<` from `j`: mostly the next line's first byte. */
const onward = (b: Uint8Array, j: number) => (b[j] === 60 ? j : b[j] === 10 && b[j + 1] === 60 ? j + 1 : b.indexOf(60, j));
const NUMS = new Float64Array(3);
const newRun = (): MeshRun => ({
  verts: new Float64Array(3 * 1024),
  nv: 0,
  tris: new Uint32Array(3 * 2048),
  nt: 0,
  triangles: 0,
  parent: undefined,
  joins: 0,
  volume6: 0,
});

/**
 * `<vertex>` elements one after another from `i` (a `<`), into the mesh (outside a mesh they are
 * read past): the loop a model spends its time in, kept small. Returns where the next other tag starts.
 */
function vertexRun(b: Uint8Array, i: number, run: MeshRun, keep: boolean, problems: string[], id: string): number {
  const nums = NUMS;
  let verts = run.verts,
    nv = run.nv;
  while (i >= 0 && b[i + 1] === 118 && isWord(b, i + 1, VERTEX)) {
    let j = fastNumbers(b, i + 7, nums, 1);
    if (j < 0) j = numbersAt(b, i + 7, nums);
    i = onward(b, j);
    if (!keep) continue;
    const x = nums[0]!,
      y = nums[1]!,
      z = nums[2]!;
    if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(z)) {
      if (problems.length < 20) problems.push(`Object ${id}: vertex ${nv + 1} is not three numbers.`);
      continue;
    }
    if (3 * nv + 3 > verts.length) {
      const grown = new Float64Array(verts.length * 2);
      grown.set(verts);
      verts = grown;
    }
    verts[3 * nv] = x;
    verts[3 * nv + 1] = y;
    verts[3 * nv + 2] = z;
    nv++;
  }
  run.verts = verts;
  run.nv = nv;
  return i;
}

/**
 * `<triangle>` elements one after another from `i`, as `vertexRun`; only well-formed ones are kept.
 * Their vertices are joined (union-find) and their volume summed on the way, while they are in cache.
 */
function triangleRun(b: Uint8Array, i: number, run: MeshRun, keep: boolean, problems: string[], id: string): number {
  const nums = NUMS;
  let tris = run.tris,
    nt = run.nt,
    triangles = run.triangles,
    joins = run.joins,
    vol = run.volume6;
  const nv = run.nv;
  const p = run.verts;
  let parent = run.parent;
  if (!parent || parent.length !== nv) {
    // Vertices come before triangles (3MF core §4.1); a mesh that adds more later starts over.
    parent = new Int32Array(nv);
    for (let v = 0; v < nv; v++) parent[v] = v;
    joins = 0;
    for (let k = 0; k < 3 * nt; k += 3) joins += join(parent, tris[k]!, tris[k + 1]!) + join(parent, tris[k]!, tris[k + 2]!);
  }
  const up = parent;
  while (i >= 0 && b[i + 1] === 116 && isWord(b, i + 1, TRIANGLE)) {
    let j = fastNumbers(b, i + 9, nums, 2);
    if (j < 0) j = numbersAt(b, i + 9, nums);
    i = onward(b, j);
    if (!keep) continue;
    const v1 = nums[0]!,
      v2 = nums[1]!,
      v3 = nums[2]!;
    triangles++;
    // 3MF core §4.1.2: three distinct indices of vertices of this mesh.
    const ok =
      Number.isInteger(v1) &&
      Number.isInteger(v2) &&
      Number.isInteger(v3) &&
      v1 >= 0 &&
      v2 >= 0 &&
      v3 >= 0 &&
      v1 < nv &&
      v2 < nv &&
      v3 < nv &&
      v1 !== v2 &&
      v2 !== v3 &&
      v1 !== v3;
    if (!ok) {
      if (problems.length < 20) problems.push(`Object ${id}: triangle ${triangles} has indices ${v1}, ${v2}, ${v3} (of ${nv} vertices).`);
      continue;
    }
    if (3 * nt + 3 > tris.length) {
      const grown = new Uint32Array(tris.length * 2);
      grown.set(tris);
      tris = grown;
    }
    tris[3 * nt] = v1;
    tris[3 * nt + 1] = v2;
    tris[3 * nt + 2] = v3;
    nt++;
    joins += join(up, v1, v2) + join(up, v1, v3);
    const a = 3 * v1,
      c = 3 * v2,
      d = 3 * v3;
    const ax = p[a]!,
      ay = p[a + 1]!,
      az = p[a + 2]!,
      bx = p[c]!,
      by = p[c + 1]!,
      bz = p[c + 2]!,
      cx = p[d]!,
      cy = p[d + 1]!,
      cz = p[d + 2]!;
    vol += ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx);
  }
  run.tris = tris;
  run.nt = nt;
  run.triangles = triangles;
  run.parent = parent;
  run.joins = joins;
  run.volume6 = vol;
  return i;
}

/** Union-find root, halving the path on the way. */
function root(parent: Int32Array, x: number): number {
  while (parent[x] !== x) {
    const g = parent[parent[x]!]!;
    parent[x] = g;
    x = g;
  }
  return x;
}
/** Join two vertices' sets under the smaller root: 1 if they were apart. */
function join(parent: Int32Array, a: number, b: number): number {
  const ra = root(parent, a),
    rb = root(parent, b);
  if (ra === rb) return 0;
  if (ra < rb) parent[rb] = ra;
  else parent[ra] = rb;
  return 1;
}

/**
 * The mesh's connected shells (3MF core §4.1: a mesh object is manifold, its triangles share their
 * vertices by index), from the union-find the triangles were read into, with each shell's triangles
 * and signed volume (divergence theorem, tetrahedra from the origin) in the object's own coordinates.
 * One shell using every vertex, the usual case, needs no second pass.
 */
function withShells(me: MeshObject & Partial<MeshRun>): MeshObject {
  const nv = me.nv,
    t = me.tris,
    p = me.verts;
  let parent = me.parent;
  if (!parent || parent.length !== nv) {
    parent = new Int32Array(nv);
    for (let v = 0; v < nv; v++) parent[v] = v;
    me.joins = 0;
    for (let k = 0; k < 3 * me.nt; k += 3) me.joins += join(parent, t[k]!, t[k + 1]!) + join(parent, t[k]!, t[k + 2]!);
    me.volume6 = undefined;
  }
  if (me.nt > 0 && nv - (me.joins ?? 0) === 1 && me.volume6 !== undefined) {
    me.shellOf = new Int32Array(nv);
    me.shells = [{ triangles: me.nt, volume: me.volume6 / 6 }];
    return me;
  }
  const shellOfRoot = new Int32Array(nv).fill(-1);
  const shells: { triangles: number; volume: number }[] = [];
  for (let i = 0; i < 3 * me.nt; i += 3) {
    const r = root(parent, t[i]!);
    let s = shellOfRoot[r]!;
    if (s < 0) s = shellOfRoot[r] = shells.push({ triangles: 0, volume: 0 }) - 1;
    const a = 3 * t[i]!,
      b = 3 * t[i + 1]!,
      c = 3 * t[i + 2]!;
    const ax = p[a]!,
      ay = p[a + 1]!,
      az = p[a + 2]!,
      bx = p[b]!,
      by = p[b + 1]!,
      bz = p[b + 2]!,
      cx = p[c]!,
      cy = p[c + 1]!,
      cz = p[c + 2]!;
    const sh = shells[s]!;
    sh.triangles++;
    sh.volume += ax * (by * cz - bz * cy) - ay * (bx * cz - bz * cx) + az * (bx * cy - by * cx);
  }
  for (const sh of shells) sh.volume /= 6;
  // A vertex no triangle uses belongs to no shell (-1).
  const shellOf = new Int32Array(nv);
  for (let v = 0; v < nv; v++) shellOf[v] = shellOfRoot[root(parent, v)]!;
  me.shellOf = shellOf;
  me.shells = shells;
  return me;
}

/** The mesh placed by `m` (row vectors, 3MF core §3.3), in millimetres: its bounds, and each shell's. */
function bodyOf(me: MeshObject, m: Matrix, scale: number, into: ThreeMfShell[]): ThreeMfBody {
  if (!me.shells) withShells(me);
  const shellOf = me.shellOf!;
  // A linear map scales volumes by its determinant (a mirror turns them inside out); a translation keeps them.
  const det = m[0]! * (m[4]! * m[8]! - m[5]! * m[7]!) - m[1]! * (m[3]! * m[8]! - m[5]! * m[6]!) + m[2]! * (m[3]! * m[7]! - m[4]! * m[6]!);
  const shells = me.shells!;
  // Per shell: min x, y, z, max x, y, z.
  const box = new Float64Array(6 * shells.length);
  for (let k = 0; k < shells.length; k++) box.fill(Infinity, 6 * k, 6 * k + 3).fill(-Infinity, 6 * k + 3, 6 * k + 6);
  let x0 = Infinity,
    y0 = Infinity,
    z0 = Infinity,
    x1 = -Infinity,
    y1 = -Infinity,
    z1 = -Infinity;
  const v = me.verts;
  const m00 = m[0]!,
    m01 = m[1]!,
    m02 = m[2]!,
    m10 = m[3]!,
    m11 = m[4]!,
    m12 = m[5]!,
    m20 = m[6]!,
    m21 = m[7]!,
    m22 = m[8]!,
    m30 = m[9]!,
    m31 = m[10]!,
    m32 = m[11]!;
  for (let i = 0; i < me.nv; i++) {
    const x = v[3 * i]!,
      y = v[3 * i + 1]!,
      z = v[3 * i + 2]!;
    const wx = (x * m00 + y * m10 + z * m20 + m30) * scale,
      wy = (x * m01 + y * m11 + z * m21 + m31) * scale,
      wz = (x * m02 + y * m12 + z * m22 + m32) * scale;
    if (wx < x0) x0 = wx;
    if (wx > x1) x1 = wx;
    if (wy < y0) y0 = wy;
    if (wy > y1) y1 = wy;
    if (wz < z0) z0 = wz;
    if (wz > z1) z1 = wz;
    const s = shellOf[i]!;
    if (s < 0) continue;
    const o = 6 * s;
    if (wx < box[o]!) box[o] = wx;
    if (wy < box[o + 1]!) box[o + 1] = wy;
    if (wz < box[o + 2]!) box[o + 2] = wz;
    if (wx > box[o + 3]!) box[o + 3] = wx;
    if (wy > box[o + 4]!) box[o + 4] = wy;
    if (wz > box[o + 5]!) box[o + 5] = wz;
  }
  shells.forEach((sh, k) => {
    const o = 6 * k;
    into.push({
      objectId: me.id,
      triangles: sh.triangles,
      min: [box[o]!, box[o + 1]!, box[o + 2]!],
      max: [box[o + 3]!, box[o + 4]!, box[o + 5]!],
      volume: sh.volume * det * scale ** 3,
    });
  });
  const min: [number, number, number] = [x0, y0, z0],
    max: [number, number, number] = [x1, y1, z1];
  return { objectId: me.id, name: me.name, triangles: me.triangles, min, max };
}

/**
 * The hot elements' usual form, `<vertex x="1.5" y="-2" z="0"/>` or `<triangle v1="0" v2="1"
 * v3="2"/>` (one space apart, plain decimals of at most 15 digits, which convert exactly as
 * digits ÷ 10^k), read without a call per byte. Anything else returns −1 and is read by
 * `numbersAt`. `nameLen` 1 reads x, y, z; 2 reads v1, v2, v3.
 */
const POW10 = Float64Array.from({ length: 16 }, (_, k) => Number(`1e${k}`));
function fastNumbers(b: Uint8Array, j: number, out: Float64Array, nameLen: 1 | 2): number {
  out[0] = out[1] = out[2] = NaN;
  for (let k = 0; k < 3; k++) {
    if (b[j] !== 32) return -1;
    let slot: number;
    if (nameLen === 1) {
      slot = b[j + 1]! - 120; // x
      j += 2;
    } else {
      if (b[j + 1] !== 118) return -1; // v
      slot = b[j + 2]! - 49; // 1
      j += 3;
    }
    if (!(slot >= 0 && slot <= 2) || b[j] !== 61 || b[j + 1] !== 34) return -1;
    j += 2;
    let c = b[j];
    const neg = c === 45;
    if (neg) c = b[++j];
    let mant = 0,
      digits = 0,
      frac = 0;
    while (c !== undefined && c >= 48 && c <= 57) {
      mant = mant * 10 + (c - 48);
      digits++;
      c = b[++j];
    }
    if (c === 46) {
      c = b[++j];
      while (c !== undefined && c >= 48 && c <= 57) {
        mant = mant * 10 + (c - 48);
        digits++;
        frac++;
        c = b[++j];
      }
    }
    if (c !== 34 || digits === 0 || digits > 15) return -1;
    j++;
    out[slot] = (neg ? -mant : mant) / POW10[frac]!;
  }
  return b[j] === 47 && b[j + 1] === 62 ? j + 2 : -1;
}
