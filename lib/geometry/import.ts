import { MeshImportError } from "./errors";
import type { ImportFormatId } from "./formats";
import { read3mf } from "./io/3mf-read";
import { readObj } from "./io/obj-read";
import { UNIT_MM, type RawModel, type RawObject, type Unit } from "./io/raw";
import { detectFormat, IMPORT_LIMITS, type ImportLimits, type MeshFormat } from "./io/sniff";
import { readStl } from "./io/stl-read";

export { detectFormat, IMPORT_LIMITS, sniffFormat, sniffHead, type ImportLimits, type MeshFormat } from "./io/sniff";
import type { Kernel } from "./kernel";
import { bounds, combineMeshes, signedVolume, windingNumber, type Bounds, type IndexedMesh } from "./mesh";
import { applyMerge, badEdges, compact, dropDegenerate, flipAll, orientConsistently, splitShells, weldExact } from "./repair";

export type ImportOptions = {
  /** The file's name as uploaded: used in messages and part names, never as a path. */
  fileName: string;
  /** Length unit of an STL or OBJ file (they declare none; millimetres by convention). Overrides a 3MF's own unit when set. */
  unit?: Unit;
  limits?: Partial<ImportLimits>;
};

export type Repair = {
  code: "welded" | "tolerance_welded" | "dropped_degenerate" | "reoriented" | "flipped_inside_out";
  count: number;
  message: string;
};

export type ImportWarning = {
  code: "units_suspect";
  message: string;
  /** The unit that would give a plausible size, with the scale it applies. */
  suggestion: { unit: Unit; scale: number };
};

/** One closed shell of the file: a candidate part. */
export type ImportedBody = {
  name: string;
  mesh: IndexedMesh;
  triangles: number;
  /** mm³, always positive (inside-out shells are flipped, but for a hollow's inner walls). */
  volume: number;
  bounds: Bounds;
  genus: number;
  /** Closed shells in the mesh: 1, or more for a hollow body (its outer skin and each void inside it). */
  shells: number;
};

export type ImportResult = {
  file: string;
  format: MeshFormat;
  unit: Unit;
  bodies: ImportedBody[];
  triangles: number;
  volume: number;
  bounds: Bounds;
  repairs: Repair[];
  warnings: ImportWarning[];
};

/** Each format's reader (formats.ts lists the formats; a new one does not compile without its reader here). */
const READERS: Record<ImportFormatId, (bytes: Uint8Array, file: string, limits: ImportLimits) => RawModel> = {
  "3mf": read3mf,
  obj: readObj,
  stl: (bytes, file, limits) => readStl(bytes, file, limits.maxTriangles),
};

/**
 * Bytes in, closed indexed shells out. Steps: read → scale to millimetres → weld exact duplicates →
 * drop degenerate triangles → (if edges are still open) weld within a tolerance → make winding
 * consistent → split into shells → flip inside-out shells → check each with the kernel.
 */
export function importMesh(bytes: Uint8Array, kernel: Kernel, options: ImportOptions): ImportResult {
  const file = options.fileName;
  const limits = { ...IMPORT_LIMITS, ...options.limits };
  if (bytes.byteLength > limits.maxBytes) {
    throw new MeshImportError("file_too_large", file, `the file is ${mb(bytes.byteLength)} MB; the limit is ${mb(limits.maxBytes)} MB`, {
      bytes: bytes.byteLength,
      limit: limits.maxBytes,
    });
  }
  const format = detectFormat(bytes, file);
  const raw = READERS[format](bytes, file, limits);

  const unit: Unit = options.unit ?? raw.declaredUnit ?? "millimeter";
  const scale = UNIT_MM[unit];
  const counts = { welded: 0, tolerance: 0, degenerate: 0, reoriented: 0, flipped: 0 };
  const bodies: ImportedBody[] = [];
  const names = new Map<string, number>();

  for (const obj of raw.objects) {
    checkFinite(obj, file);
    const shells = withVoids(cleanObject(obj, scale, kernel, counts, file));
    shells.forEach((mesh, i) => {
      let name = shells.length > 1 ? `${obj.name} ${i + 1}` : obj.name;
      const seen = names.get(name) ?? 0;
      names.set(name, seen + 1);
      if (seen > 0) name = `${name} (${seen + 1})`;
      bodies.push(measure(mesh, name, kernel, file, counts));
    });
  }

  const all = unionBounds(bodies.map((b) => b.bounds));
  const repairs: Repair[] = [];
  // STL is a triangle soup by definition: joining its corners is reading it, not repairing it.
  if (counts.welded && format !== "stl")
    repairs.push({ code: "welded", count: counts.welded, message: `joined ${counts.welded.toLocaleString("en-US")} duplicate vertices` });
  if (counts.degenerate)
    repairs.push({
      code: "dropped_degenerate",
      count: counts.degenerate,
      message: `dropped ${counts.degenerate.toLocaleString("en-US")} triangles with no area`,
    });
  if (counts.tolerance)
    repairs.push({
      code: "tolerance_welded",
      count: counts.tolerance,
      message:
        `closed gaps by joining ${counts.tolerance.toLocaleString("en-US")} vertices that were almost, but not exactly, in ` +
        `the same place`,
    });
  if (counts.reoriented)
    repairs.push({
      code: "reoriented",
      count: counts.reoriented,
      message: `turned ${counts.reoriented.toLocaleString("en-US")} triangles that faced the wrong way`,
    });
  if (counts.flipped)
    repairs.push({
      code: "flipped_inside_out",
      count: counts.flipped,
      message: `turned ${counts.flipped} inside-out ${counts.flipped === 1 ? "body" : "bodies"} right way out`,
    });

  return {
    file,
    format,
    unit,
    bodies,
    triangles: bodies.reduce((s, b) => s + b.triangles, 0),
    volume: bodies.reduce((s, b) => s + b.volume, 0),
    bounds: all,
    repairs,
    warnings: unitWarnings(all, unit, format, options.unit !== undefined),
  };
}

function checkFinite(obj: RawObject, file: string) {
  const p = obj.positions;
  for (let i = 0; i < p.length; i++) {
    if (!Number.isFinite(p[i]!)) {
      throw new MeshImportError(
        "non_finite",
        file,
        `vertex ${Math.floor(i / 3) + 1} of ${obj.name} has a coordinate that is not a finite number (${p[i]})`,
      );
    }
  }
  const nv = p.length / 3;
  const t = obj.triangles;
  for (let i = 0; i < t.length; i++) {
    if (t[i]! >= nv)
      throw new MeshImportError("index_out_of_range", file, `a triangle of ${obj.name} refers to vertex ${t[i]}, but there are ${nv}`);
  }
}

function cleanObject(obj: RawObject, scale: number, kernel: Kernel, counts: Record<string, number>, file: string): IndexedMesh[] {
  let positions = obj.positions;
  if (scale !== 1) {
    positions = new Float32Array(obj.positions.length);
    for (let i = 0; i < positions.length; i++) positions[i] = obj.positions[i]! * scale;
  }
  const welded = weldExact(positions, obj.triangles);
  counts.welded! += welded.merged;
  const cleaned = dropDegenerate(welded.mesh);
  counts.degenerate! += cleaned.dropped;
  let mesh = cleaned.mesh;
  if (mesh.triVerts.length === 0) throw new MeshImportError("zero_volume", file, `${obj.name} has no triangles with any area`);

  let edges = badEdges(mesh);
  if (edges.open > 0) {
    const merged = toleranceWeld(mesh, kernel);
    if (merged > 0) {
      const again = dropDegenerate(compact(mesh.vertProperties, mesh.triVerts));
      mesh = again.mesh;
      counts.degenerate! += again.dropped;
      counts.tolerance! += merged;
      edges = badEdges(mesh);
    }
  }
  if (edges.open > 0) {
    throw new MeshImportError(
      "open_mesh",
      file,
      `${obj.name} is not closed: ${edges.open.toLocaleString("en-US")} open ${edges.open === 1 ? "edge" : "edges"} remain after ` +
        `repair (holes in the surface); close them in your modelling program`,
      {
        openEdges: edges.open,
      },
    );
  }
  if (edges.nonManifold > 0) {
    throw new MeshImportError(
      "not_manifold",
      file,
      `${obj.name} has ${edges.nonManifold.toLocaleString("en-US")} ${edges.nonManifold === 1 ? "edge" : "edges"} shared by more ` +
        `than two triangles; it is not a single printable solid`,
      {
        edges: edges.nonManifold,
      },
    );
  }
  if (edges.misoriented > 0) counts.reoriented! += orientConsistently(mesh);
  return splitShells(mesh);
}

/**
 * Join vertices along open edges that lie within a small distance, using the kernel's own merge.
 * The tolerance is a ten-thousandth of the part's diagonal, at most 0.01 mm: well above the float32
 * rounding of exporters that write each facet's corners separately, far below anything a 0.4 mm
 * nozzle can print (common practice), and small enough never to close a real hole in a tiny part.
 */
function toleranceWeld(mesh: IndexedMesh, kernel: Kernel): number {
  const b = bounds(mesh);
  const diag = Math.hypot(b.max[0] - b.min[0], b.max[1] - b.min[1], b.max[2] - b.min[2]);
  // A Mesh is a plain JS object on the kernel's side: nothing to delete.
  const m = new kernel.wasm.Mesh({
    numProp: 3,
    vertProperties: mesh.vertProperties,
    triVerts: mesh.triVerts,
    tolerance: Math.min(0.01, diag * 1e-4),
  });
  if (!m.merge()) return 0;
  applyMerge(mesh, m.mergeFromVert, m.mergeToVert);
  return m.mergeFromVert.length;
}

type Shell = { mesh: IndexedMesh; volume: number; bounds: Bounds; voids: IndexedMesh[] };

/**
 * An inside-out shell that lies inside a right-way-out shell of the same object is that body's void
 * (a hollow part, printed with walls): it is kept, inside out, in the outer shell's mesh. Any other
 * inside-out shell is the exporter's mistake, and `measure` turns it right way out. Inside is told
 * by the bounds and the winding number of one of the inner shell's corners (≥ ½).
 */
function withVoids(meshes: IndexedMesh[]): (IndexedMesh & { shells?: number })[] {
  if (meshes.length < 2) return meshes;
  const shells: Shell[] = meshes.map((mesh) => ({ mesh, volume: signedVolume(mesh), bounds: bounds(mesh), voids: [] }));
  const inside = (b: Bounds, o: Bounds) => [0, 1, 2].every((k) => b.min[k]! > o.min[k]! && b.max[k]! < o.max[k]!);
  const kept: Shell[] = [];
  for (const s of shells) {
    if (s.volume < 0) {
      const p = s.mesh.vertProperties;
      // The smallest right-way-out shell round it (a void belongs to the wall nearest it).
      const outer = shells
        .filter((o) => o.volume > 0 && inside(s.bounds, o.bounds) && windingNumber(o.mesh, p[0]!, p[1]!, p[2]!) >= 0.5)
        .sort((a, b) => a.volume - b.volume)[0];
      if (outer) {
        outer.voids.push(s.mesh);
        continue;
      }
    }
    kept.push(s);
  }
  return kept.map((s) => (s.voids.length ? Object.assign(combineMeshes([s.mesh, ...s.voids]), { shells: 1 + s.voids.length }) : s.mesh));
}

function measure(
  mesh: IndexedMesh & { shells?: number },
  name: string,
  kernel: Kernel,
  file: string,
  counts: Record<string, number>,
): ImportedBody {
  let volume = signedVolume(mesh);
  const b = bounds(mesh);
  const size = Math.max(b.max[0] - b.min[0], b.max[1] - b.min[1], b.max[2] - b.min[2]);
  if (Math.abs(volume) <= 1e-9 * size * size * size || Math.abs(volume) < 1e-6) {
    throw new MeshImportError("zero_volume", file, `${name} encloses no volume (a flat or double-sided surface, not a solid)`);
  }
  if (volume < 0) {
    flipAll(mesh);
    volume = -volume;
    counts.flipped!++;
  }
  const scope = kernel.scope();
  try {
    const m = new kernel.wasm.Mesh({ numProp: 3, vertProperties: mesh.vertProperties, triVerts: mesh.triVerts });
    let solid;
    try {
      solid = scope.track(new kernel.wasm.Manifold(m));
    } catch (err) {
      const code = (err as { code?: string }).code ?? "unknown";
      throw new MeshImportError("not_manifold", file, `${name} is not a valid solid for the geometry kernel (${code})`, { kernel: code });
    }
    return {
      name,
      mesh: { vertProperties: mesh.vertProperties, triVerts: mesh.triVerts },
      triangles: mesh.triVerts.length / 3,
      volume,
      bounds: b,
      genus: solid.genus(),
      shells: mesh.shells ?? 1,
    };
  } finally {
    scope.close();
  }
}

function unionBounds(list: Bounds[]): Bounds {
  const min: [number, number, number] = [Infinity, Infinity, Infinity];
  const max: [number, number, number] = [-Infinity, -Infinity, -Infinity];
  for (const b of list) {
    for (let a = 0; a < 3; a++) {
      min[a] = Math.min(min[a]!, b.min[a]!);
      max[a] = Math.max(max[a]!, b.max[a]!);
    }
  }
  return { min, max };
}

/**
 * A part under 1 mm or over 1 m overall was probably saved in other units (common practice: STL has
 * no unit field and exporters differ). Suggest the unit that brings it to 1–1000 mm.
 */
function unitWarnings(b: Bounds, unit: Unit, format: MeshFormat, chosen: boolean): ImportWarning[] {
  const size = Math.max(b.max[0] - b.min[0], b.max[1] - b.min[1], b.max[2] - b.min[2]);
  if (size >= 1 && size <= 1000) return [];
  const base = size / UNIT_MM[unit];
  const order: Unit[] = size < 1 ? ["inch", "centimeter", "meter"] : ["micron"];
  for (const u of order) {
    const s = base * UNIT_MM[u];
    if (s >= 5 && s <= 1000) {
      const declared = format === "3mf" && !chosen ? "The file says" : "Read as";
      return [
        {
          code: "units_suspect",
          message:
            `${declared} ${unit}s, the part is ${size.toPrecision(3)} mm across — ` +
            `${size < 1 ? "smaller than a millimetre" : "over a metre"}. Read as ${u}s it would be ${s.toPrecision(3)} mm.`,
          suggestion: { unit: u, scale: UNIT_MM[u] / UNIT_MM[unit] },
        },
      ];
    }
  }
  return [];
}

function mb(n: number): string {
  return (n / 1024 / 1024).toFixed(n < 10 * 1024 * 1024 ? 1 : 0);
}
