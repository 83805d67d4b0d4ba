import { SaxesParser, type SaxesTagNS } from "saxes";
import { MeshImportError } from "../errors";
import { UNIT_MM, type RawModel, type RawObject, type Unit } from "./raw";
import { stem, tooMany } from "./stl-read";
import { inflateEntry, inflateEntryTo, readZipDirectory } from "./zip-read";

/**
 * 3MF Core Specification 1.4.0 (3MF Consortium): an OPC/ZIP package whose start part (found through
 * `_rels/.rels`) is the model XML. We read mesh objects, components, build items with their
 * transforms and the model `unit`. Extensions we cannot honour are refused rather than half-read:
 * production-extension `p:path` references (geometry in other parts) and any other required extension.
 */
export const NS_CORE = "http://schemas.microsoft.com/3dmanufacturing/core/2015/02";
export const NS_PRODUCTION = "http://schemas.microsoft.com/3dmanufacturing/production/2015/06";
const NS_MATERIAL = "http://schemas.microsoft.com/3dmanufacturing/material/2015/02";
export const REL_START_PART = "http://schemas.microsoft.com/3dmanufacturing/2013/01/3dmodel";
const NS_RELS = "http://schemas.openxmlformats.org/package/2006/relationships";

/** Extensions whose content we may ignore without changing the geometry (colours only). */
const IGNORABLE_REQUIRED = new Set([NS_MATERIAL]);

type Mat = [number, number, number, number, number, number, number, number, number, number, number, number];
const IDENTITY: Mat = [1, 0, 0, 0, 1, 0, 0, 0, 1, 0, 0, 0];

type MeshObj = { kind: "mesh"; id: string; name: string; type: string; positions: number[]; triangles: number[] };
type CompObj = { kind: "components"; id: string; name: string; type: string; components: { objectId: string; transform: Mat }[] };
type Obj = MeshObj | CompObj;

export type ThreeMfLimits = {
  maxInflatedBytes: number;
  maxTriangles: number;
  maxVertices: number;
  maxBodies: number;
  maxComponents: number;
};

export function read3mf(bytes: Uint8Array, file: string, limits: ThreeMfLimits): RawModel {
  const entries = readZipDirectory(bytes, file, { maxInflatedBytes: limits.maxInflatedBytes });
  let budget = limits.maxInflatedBytes;
  const rels = entries.get("_rels/.rels");
  let modelPath = "3d/3dmodel.model";
  if (rels) {
    const out = inflateEntry(bytes, rels, file, budget, limits.maxInflatedBytes);
    budget -= out.byteLength;
    const target = startPartTarget(new TextDecoder().decode(out), file);
    if (target) modelPath = target.replace(/^\//, "").toLowerCase();
  }
  const model = entries.get(modelPath);
  if (!model) throw new MeshImportError("malformed", file, `the 3MF package has no model part (${modelPath})`);
  // The model is inflated, decoded and parsed chunk by chunk: its XML is never held whole, and a
  // limit that trips stops the inflating too.
  const parser = modelParser(file, limits);
  const text = new TextDecoder("utf-8");
  inflateEntryTo(bytes, model, file, budget, (chunk) => parser.write(text.decode(chunk, { stream: true })), limits.maxInflatedBytes);
  parser.write(text.decode());
  return parser.close();
}

function startPartTarget(xml: string, file: string): string | null {
  let target: string | null = null;
  const p = new SaxesParser({ xmlns: true });
  p.on("doctype", () => {
    throw new MeshImportError("xml_dtd_forbidden", file, "the package relationships declare a DTD; 3MF forbids DTDs");
  });
  p.on("opentag", (tag) => {
    if (tag.local === "Relationship" && tag.uri === NS_RELS && tag.attributes.Type?.value === REL_START_PART) {
      target ??= tag.attributes.Target?.value ?? null;
    }
  });
  p.on("error", (e) => {
    throw new MeshImportError("malformed", file, `the package relationships are not well-formed XML (${e.message.split("\n")[0]})`);
  });
  p.write(xml).close();
  return target;
}

/** Parse a whole model part's XML (the package reader streams it through `modelParser` instead). */
export function parseModel(xml: string, file: string, limits: Pick<ThreeMfLimits, "maxTriangles"> & Partial<ThreeMfLimits>): RawModel {
  const p = modelParser(file, { maxVertices: Infinity, maxBodies: Infinity, maxComponents: Infinity, ...limits });
  p.write(xml);
  return p.close();
}

/**
 * A streaming reader of the model part. Every count an attacker could inflate is checked as it grows:
 * triangles and vertices as they are read (an object may not list more vertices than its triangles
 * can use), then bodies, placed triangles and component references of the build are counted over the
 * component graph before a single mesh is placed.
 */
export function modelParser(
  file: string,
  limits: Omit<ThreeMfLimits, "maxInflatedBytes">,
): { write(text: string): void; close(): RawModel } {
  const { maxTriangles, maxVertices } = limits;
  const objects = new Map<string, Obj>();
  const items: { objectId: string; transform: Mat }[] = [];
  let unit: Unit = "millimeter";
  let current: Obj | null = null;
  let triangles = 0;
  let vertices = 0;
  const p = new SaxesParser({ xmlns: true, position: true });

  const fail = (code: "malformed" | "index_out_of_range" | "unsupported_extension" | "non_finite", msg: string) => {
    throw new MeshImportError(code, file, `line ${p.line}: ${msg}`, { line: p.line });
  };
  const num = (tag: SaxesTagNS, name: string) => {
    const raw = tag.attributes[name]?.value;
    if (raw === undefined) fail("malformed", `<${tag.local}> is missing ${name}`);
    const v = Number(raw);
    if (raw!.trim() === "" || Number.isNaN(v)) fail("malformed", `${name}="${raw!.slice(0, 20)}" is not a number`);
    return v;
  };
  const refusePath = (tag: SaxesTagNS) => {
    for (const a of Object.values(tag.attributes)) {
      if (a.local === "path" && a.uri === NS_PRODUCTION) {
        fail(
          "unsupported_extension",
          `<${tag.local}> refers to geometry in another part (p:path="${a.value.slice(0, 60)}"), from the 3MF production extension, ` +
            `which Slabwright does not read; export the model without the production extension`,
        );
      }
    }
  };

  p.on("doctype", () => {
    throw new MeshImportError("xml_dtd_forbidden", file, "the model declares a DTD (and perhaps entities); 3MF forbids DTDs");
  });
  p.on("error", (e) => {
    throw new MeshImportError("malformed", file, `the model is not well-formed XML (${e.message.split("\n")[0]})`);
  });
  p.on("opentag", (tag) => {
    if (tag.uri !== NS_CORE) return; // other namespaces carry colours, slicer settings and the like
    switch (tag.local) {
      case "model": {
        const u = tag.attributes.unit?.value ?? "millimeter";
        if (!Object.hasOwn(UNIT_MM, u)) fail("malformed", `unit="${u}" is not a 3MF unit`);
        unit = u as Unit;
        const required = (tag.attributes.requiredextensions?.value ?? "").split(/\s+/).filter(Boolean);
        for (const prefix of required) {
          const uri = tag.ns?.[prefix];
          if (!uri || !IGNORABLE_REQUIRED.has(uri)) {
            fail(
              "unsupported_extension",
              `the model requires the 3MF extension "${prefix}"${uri ? ` (${uri})` : ""}, which Slabwright does not read`,
            );
          }
        }
        break;
      }
      case "object": {
        const id = tag.attributes.id?.value;
        if (!id) fail("malformed", "<object> is missing its id");
        current = {
          kind: "mesh",
          id: id!,
          name: tag.attributes.name?.value ?? "",
          type: tag.attributes.type?.value ?? "model",
          positions: [],
          triangles: [],
        };
        break;
      }
      case "vertex": {
        if (current?.kind !== "mesh") fail("malformed", "<vertex> outside a mesh");
        const m = current as MeshObj;
        const x = num(tag, "x"),
          y = num(tag, "y"),
          z = num(tag, "z");
        if (!Number.isFinite(x) || !Number.isFinite(y) || !Number.isFinite(z)) fail("non_finite", "a vertex coordinate is not finite");
        if (++vertices > maxVertices)
          throw tooManyVertices(file, vertices, maxVertices, `more than the limit of ${maxVertices.toLocaleString("en-US")} per file`);
        m.positions.push(x, y, z);
        break;
      }
      case "triangle": {
        if (current?.kind !== "mesh") fail("malformed", "<triangle> outside a mesh");
        const m = current as MeshObj;
        const nv = m.positions.length / 3;
        const v1 = num(tag, "v1"),
          v2 = num(tag, "v2"),
          v3 = num(tag, "v3");
        for (const v of [v1, v2, v3]) {
          if (!Number.isInteger(v) || v < 0 || v >= nv)
            fail("index_out_of_range", `a triangle refers to vertex ${v}, but object ${m.id} has ${nv} vertices`);
        }
        m.triangles.push(v1, v2, v3);
        if (++triangles > maxTriangles) throw tooMany(file, triangles, maxTriangles);
        break;
      }
      case "components":
        if (!current) fail("malformed", "<components> outside an object");
        current = { kind: "components", id: current!.id, name: current!.name, type: current!.type, components: [] };
        break;
      case "component": {
        if (current?.kind !== "components") fail("malformed", "<component> outside <components>");
        refusePath(tag);
        const objectId = tag.attributes.objectid?.value;
        if (!objectId) fail("malformed", "<component> is missing objectid");
        (current as CompObj).components.push({ objectId: objectId!, transform: matrix(tag.attributes.transform?.value, fail) });
        break;
      }
      case "item": {
        refusePath(tag);
        const objectId = tag.attributes.objectid?.value;
        if (!objectId) fail("malformed", "<item> is missing objectid");
        items.push({ objectId: objectId!, transform: matrix(tag.attributes.transform?.value, fail) });
        break;
      }
    }
  });
  p.on("closetag", (tag) => {
    if (tag.uri === NS_CORE && tag.local === "object" && current) {
      if (current.kind === "mesh") unusedVertices(current, file);
      objects.set(current.id, current);
      current = null;
    }
  });

  return {
    write(text: string) {
      p.write(text);
    },
    close(): RawModel {
      p.close();
      return flatten(objects, items, unit, file, limits);
    },
  };
}

/**
 * Each vertex of a triangle mesh serves at least one triangle, so an object can use at most three per
 * triangle; the floor lets small stubs (an object with a few stray points) through.
 */
function unusedVertices(m: MeshObj, file: string) {
  const nv = m.positions.length / 3;
  const nt = m.triangles.length / 3;
  if (nv > Math.max(3 * nt, 65_536)) {
    throw tooManyVertices(
      file,
      nv,
      Math.max(3 * nt, 65_536),
      `for ${nt.toLocaleString("en-US")} triangles in object ${m.id}: no triangle uses most of them`,
      nt,
    );
  }
}

function tooManyVertices(file: string, n: number, limit: number, why: string, triangles?: number) {
  return new MeshImportError(
    "too_many_vertices",
    file,
    `${n.toLocaleString("en-US")} vertices is ${why}`,
    triangles === undefined ? { vertices: n, limit } : { vertices: n, limit, triangles },
  );
}

type Tally = { bodies: number; triangles: number; components: number };

/**
 * Flatten build items through components into placed meshes. The component graph is counted first,
 * once per object (memoised), so a package of nested references that would expand to millions of
 * bodies is refused from a few hundred objects' worth of arithmetic, before any mesh is placed.
 */
function flatten(
  objects: Map<string, Obj>,
  items: { objectId: string; transform: Mat }[],
  unit: Unit,
  file: string,
  limits: Omit<ThreeMfLimits, "maxInflatedBytes">,
): RawModel {
  const tallies = new Map<string, Tally>();
  const onPath = new Set<string>();
  const tally = (id: string): Tally => {
    const obj = objects.get(id);
    if (!obj) throw new MeshImportError("malformed", file, `a build item or component refers to object ${id}, which is not defined`);
    if (onPath.has(id)) throw new MeshImportError("malformed", file, `object ${id} contains itself through its components`);
    const known = tallies.get(id);
    if (known) return known;
    let t: Tally = { bodies: 0, triangles: 0, components: 0 };
    if (obj.type === "model" || obj.type === "solidsupport") {
      if (obj.kind === "mesh") t = obj.triangles.length ? { bodies: 1, triangles: obj.triangles.length / 3, components: 0 } : t;
      else {
        onPath.add(id);
        for (const c of obj.components) {
          const sub = tally(c.objectId);
          t.bodies += sub.bodies;
          t.triangles += sub.triangles;
          t.components += sub.components + 1;
        }
        onPath.delete(id);
      }
    }
    tallies.set(id, t);
    return t;
  };
  const total: Tally = { bodies: 0, triangles: 0, components: 0 };
  for (const item of items) {
    const t = tally(item.objectId);
    total.bodies += t.bodies;
    total.triangles += t.triangles;
    total.components += t.components;
  }
  const n = (v: number) => (Number.isSafeInteger(v) ? v.toLocaleString("en-US") : "astronomically many");
  if (total.bodies > limits.maxBodies) {
    throw new MeshImportError(
      "too_many_bodies",
      file,
      `the build places ${n(total.bodies)} bodies (components nested inside components), more than the limit of ` +
        `${limits.maxBodies.toLocaleString("en-US")} per file`,
      { bodies: total.bodies, limit: limits.maxBodies },
    );
  }
  if (total.components > limits.maxComponents) {
    throw new MeshImportError(
      "too_many_components",
      file,
      `the build expands through ${n(total.components)} component references, more than the limit of ` +
        `${limits.maxComponents.toLocaleString("en-US")}`,
      { components: total.components, limit: limits.maxComponents },
    );
  }
  if (total.triangles > limits.maxTriangles) throw tooMany(file, total.triangles, limits.maxTriangles);

  const out: RawObject[] = [];
  const expand = (id: string, m: Mat, inherited: string) => {
    const obj = objects.get(id)!; // every reference was resolved by the tally above
    if (obj.type !== "model" && obj.type !== "solidsupport") return; // support, surface and other objects are not parts
    const name = obj.name || inherited;
    if (obj.kind === "components") {
      for (const c of obj.components) expand(c.objectId, multiply(c.transform, m), name);
      return;
    }
    if (obj.triangles.length === 0) return;
    out.push(placeMesh(obj, m, name || `${stem(file)} ${id}`));
  };
  for (const item of items) expand(item.objectId, item.transform, "");
  if (items.length === 0 && objects.size > 0) {
    throw new MeshImportError("empty", file, "the model has objects but no build items, so nothing is to be printed");
  }
  if (out.length === 0) throw new MeshImportError("empty", file, "the model holds no printable mesh");
  return { format: "3mf", declaredUnit: unit, objects: out };
}

function placeMesh(obj: MeshObj, m: Mat, name: string): RawObject {
  const src = obj.positions;
  const positions = new Float32Array(src.length);
  for (let i = 0; i < src.length; i += 3) {
    const x = src[i]!,
      y = src[i + 1]!,
      z = src[i + 2]!;
    // 3MF transforms act on row vectors: [x y z 1] · M, M given as m00 m01 m02 m10 … m32.
    positions[i] = x * m[0] + y * m[3] + z * m[6] + m[9];
    positions[i + 1] = x * m[1] + y * m[4] + z * m[7] + m[10];
    positions[i + 2] = x * m[2] + y * m[5] + z * m[8] + m[11];
  }
  const triangles = Uint32Array.from(obj.triangles);
  if (determinant(m) < 0) {
    // A mirroring transform turns the winding inside out; swap two corners to keep it outward.
    for (let t = 0; t < triangles.length; t += 3) {
      const b = triangles[t + 1]!;
      triangles[t + 1] = triangles[t + 2]!;
      triangles[t + 2] = b;
    }
  }
  return { name, positions, triangles };
}

function matrix(raw: string | undefined, fail: (code: "malformed", msg: string) => never): Mat {
  if (raw === undefined) return IDENTITY;
  const parts = raw.trim().split(/\s+/).map(Number);
  if (parts.length !== 12 || parts.some((v) => !Number.isFinite(v))) fail("malformed", `transform="${raw.slice(0, 60)}" is not 12 numbers`);
  return parts as Mat;
}

/** a then b, both in the row-vector convention. */
function multiply(a: Mat, b: Mat): Mat {
  const r = new Array<number>(12);
  for (let row = 0; row < 4; row++) {
    for (let col = 0; col < 3; col++) {
      let s = row === 3 ? b[9 + col]! : 0;
      for (let k = 0; k < 3; k++) s += a[row * 3 + k]! * b[k * 3 + col]!;
      r[row * 3 + col] = s;
    }
  }
  return r as Mat;
}

function determinant(m: Mat): number {
  return m[0] * (m[4] * m[8] - m[5] * m[7]) - m[1] * (m[3] * m[8] - m[5] * m[6]) + m[2] * (m[3] * m[7] - m[4] * m[6]);
}
