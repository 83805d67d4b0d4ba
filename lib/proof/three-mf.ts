import { Unzip, unzipSync, type UnzipDecoder } from "fflate";

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

export type ThreeMfBody = { objectId: string; name: string; triangles: number; min: [number, number, number]; max: [number, number, number] };
export type ThreeMfRead = { unit: string; bodies: ThreeMfBody[]; problems: string[] };

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
  return utf8.decode(b.subarray(a.start, a.end)).replace(/&(#x[0-9a-f]+|#\d+|[a-z]+);/gi, (whole, e: string) =>
    e[0] === "#" ? String.fromCodePoint(e[1] === "x" || e[1] === "X" ? parseInt(e.slice(2), 16) : Number(e.slice(1))) : (ENTITIES[e] ?? whole),
  );
}

/** A decimal number (ST_Number: optional sign, digits, fraction, exponent) from bytes; NaN if malformed. */
function num(b: Uint8Array, start: number, end: number): number {
  let i = start;
  let sign = 1;
  if (b[i] === 45) (sign = -1), i++;
  else if (b[i] === 43) i++;
  let mant = 0, digits = 0, scale = 0;
  while (i < end && b[i]! >= 48 && b[i]! <= 57) (mant = mant * 10 + (b[i]! - 48)), i++, digits++;
  if (b[i] === 46) {
    i++;
    while (i < end && b[i]! >= 48 && b[i]! <= 57) (mant = mant * 10 + (b[i]! - 48)), i++, scale--, digits++;
  }
  if (digits === 0) return NaN;
  if (b[i] === 101 || b[i] === 69) {
    i++;
    let es = 1, e = 0, ed = 0;
    if (b[i] === 45) (es = -1), i++;
    else if (b[i] === 43) i++;
    while (i < end && b[i]! >= 48 && b[i]! <= 57) (e = e * 10 + (b[i]! - 48)), i++, ed++;
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

type MeshObject = { id: string; name: string; verts: Float64Array; nv: number; triangles: number };
type ComponentsObject = { id: string; name: string; components: { objectId: string; transform: Matrix }[] };

/** Raw DEFLATE (RFC 1951) decoder, e.g. node:zlib's `inflateRawSync`, faster than fflate's on big models. */
export type InflateRaw = (data: Uint8Array) => Uint8Array;

/**
 * Entries of a zip package by name. fflate reads the package; DEFLATE'd entries are expanded by
 * `inflateRaw` when one is given (a decoder registered with fflate's Unzip), else by fflate itself.
 */
function unzipEntry(bytes: Uint8Array, name: string, inflateRaw?: InflateRaw): Uint8Array | undefined {
  try {
    if (!inflateRaw) return unzipSync(bytes, { filter: (f) => f.name === name })[name];
    let found: Uint8Array | undefined;
    let failure: unknown;
    const unzip = new Unzip((file) => {
      if (file.name !== name) return;
      const chunks: Uint8Array[] = [];
      file.ondata = (err, chunk, final) => {
        if (err) failure = err;
        chunks.push(chunk);
        if (final) found = chunks.length === 1 ? chunks[0] : concat(chunks);
      };
      file.start();
    });
    unzip.register(decoderWith(inflateRaw));
    unzip.push(bytes, true);
    if (failure) throw failure;
    return found;
  } catch (err) {
    throw new ThreeMfProofError(`The 3MF is not a readable zip package (${err instanceof Error ? err.message : String(err)}).`);
  }
}

function decoderWith(inflateRaw: InflateRaw) {
  return class implements UnzipDecoder {
    static compression = 8;
    private chunks: Uint8Array[] = [];
    ondata: UnzipDecoder["ondata"] = () => {};
    push(chunk: Uint8Array, final: boolean) {
      this.chunks.push(chunk.slice());
      if (!final) return;
      let out: Uint8Array;
      try {
        out = inflateRaw(this.chunks.length === 1 ? this.chunks[0]! : concat(this.chunks));
      } catch (err) {
        this.ondata(err instanceof Error ? Object.assign(err, { code: 0 }) : null, new Uint8Array(0), true);
        return;
      }
      this.ondata(null, out as Uint8Array<ArrayBuffer>, true);
    }
  };
}

function concat(chunks: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(chunks.reduce((s, c) => s + c.length, 0));
  let o = 0;
  for (const c of chunks) (out.set(c, o), (o += c.length));
  return out;
}

/** Read the build of a 3MF package: every mesh it places, with its triangle count and bounds (mm). */
export function readThreeMfBodies(bytes: Uint8Array, inflateRaw?: InflateRaw): ThreeMfRead {
  const rels = unzipEntry(bytes, "_rels/.rels", inflateRaw);
  if (!rels) throw new ThreeMfProofError("The 3MF has no _rels/.rels part (OPC requires it to name the model).");
  let target: string | undefined;
  for (const t of tags(rels)) {
    if (t.name !== "Relationship" || t.closing) continue;
    const type = t.attrs.find((a) => a.name === "Type");
    const tg = t.attrs.find((a) => a.name === "Target");
    if (type && tg && text(rels, type) === REL_MODEL) target = text(rels, tg).replace(/^\//, "");
  }
  if (!target) throw new ThreeMfProofError("The 3MF's relationships name no 3D model part.");
  const model = unzipEntry(bytes, target, inflateRaw);
  if (!model) throw new ThreeMfProofError(`The 3MF names ${target} as its model, but the package has no such part.`);
  return readModel(model);
}

export function readModel(b: Uint8Array): ThreeMfRead {
  const problems: string[] = [];
  const meshes = new Map<string, MeshObject>();
  const groups = new Map<string, ComponentsObject>();
  const items: { objectId: string; transform: Matrix }[] = [];
  let unit = "millimeter";
  let seenModel = false;
  let object: { id: string; name: string } | null = null;
  let mesh: MeshObject | null = null;
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
  const V = "vertex", TRI = "triangle";
  const isName = (at: number, word: string) => {
    for (let k = 0; k < word.length; k++) if (b[at + k] !== word.charCodeAt(k)) return false;
    return isSpace(b[at + word.length] ?? 0);
  };
  const nums = new Float64Array(3);
  for (let i = b.indexOf(60); i >= 0 && i < b.length; i = b.indexOf(60, i)) {
    if (isName(i + 1, V)) {
      i = numbersAt(b, i + 1 + V.length, nums);
      if (!mesh) continue;
      const x = nums[0]!, y = nums[1]!, z = nums[2]!;
      if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(z)) {
        if (problems.length < 20) problems.push(`Object ${mesh.id}: vertex ${mesh.nv + 1} is not three numbers.`);
        continue;
      }
      if (3 * mesh.nv + 3 > mesh.verts.length) {
        const grown = new Float64Array(mesh.verts.length * 2);
        grown.set(mesh.verts);
        mesh.verts = grown;
      }
      mesh.verts[3 * mesh.nv] = x;
      mesh.verts[3 * mesh.nv + 1] = y;
      mesh.verts[3 * mesh.nv + 2] = z;
      mesh.nv++;
      continue;
    }
    if (isName(i + 1, TRI)) {
      i = numbersAt(b, i + 1 + TRI.length, nums);
      if (!mesh) continue;
      const v1 = nums[0]!, v2 = nums[1]!, v3 = nums[2]!;
      // 3MF core §4.1.2: three distinct indices of vertices of this mesh.
      const ok = Number.isInteger(v1) && Number.isInteger(v2) && Number.isInteger(v3) && v1 >= 0 && v2 >= 0 && v3 >= 0 && v1 < mesh.nv && v2 < mesh.nv && v3 < mesh.nv && v1 !== v2 && v2 !== v3 && v1 !== v3;
      if (!ok && problems.length < 20) problems.push(`Object ${mesh.id}: triangle ${mesh.triangles + 1} has indices ${v1}, ${v2}, ${v3} (of ${mesh.nv} vertices).`);
      mesh.triangles++;
      continue;
    }
    const { tag: t, next } = tagAt(b, i);
    i = next;
    if (!t) continue;
    const nm = t.name;
    if (nm.includes(":")) continue; // another namespace's element
    if (t.closing) {
      if (nm === "object") {
        if (mesh) meshes.set(mesh.id, mesh);
        if (group) groups.set(group.id, group);
        object = mesh = group = null;
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
        if (object) mesh = { ...object, verts: new Float64Array(3 * 1024), nv: 0, triangles: 0 };
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
  const place = (id: string, m: Matrix, depth: number) => {
    if (depth > 16) {
      problems.push(`Object ${id}: components nest more than 16 deep (a cycle?).`);
      return;
    }
    const me = meshes.get(id);
    if (me) {
      bodies.push(bodyOf(me, m, scale));
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
  return { unit, bodies, problems };
}

function bodyOf(me: MeshObject, m: Matrix, scale: number): ThreeMfBody {
  const min: [number, number, number] = [Infinity, Infinity, Infinity];
  const max: [number, number, number] = [-Infinity, -Infinity, -Infinity];
  const v = me.verts;
  for (let i = 0; i < me.nv; i++) {
    const x = v[3 * i]!, y = v[3 * i + 1]!, z = v[3 * i + 2]!;
    for (let c = 0; c < 3; c++) {
      const s = (x * m[c]! + y * m[3 + c]! + z * m[6 + c]! + m[9 + c]!) * scale;
      if (s < min[c]!) min[c] = s;
      if (s > max[c]!) max[c] = s;
    }
  }
  return { objectId: me.id, name: me.name, triangles: me.triangles, min, max };
}
