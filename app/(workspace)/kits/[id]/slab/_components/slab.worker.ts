/// <reference lib="webworker" />
import { buildPlate, newPartCache, type PlatePart } from "@/lib/geometry/build-plate";
import { MeshImportError } from "@/lib/geometry/errors";
import { ENGRAVING_FONTS, parseFontBook, type EngravingFontId, type FontBook } from "@/lib/geometry/fonts";
import { importMesh } from "@/lib/geometry/import";
import type { Unit } from "@/lib/geometry/io/raw";
import { loadKernel, type Kernel } from "@/lib/geometry/kernel";
import { combineMeshes } from "@/lib/geometry/mesh";
import { orientMesh } from "@/lib/geometry/orient";
import type { DisplayPart, FromWorker, ToWorker } from "./protocol";

const post = (m: FromWorker, transfer: Transferable[] = []) => (self as unknown as DedicatedWorkerGlobalScope).postMessage(m, transfer);

let kernel: Kernel | undefined;
let fonts: FontBook | undefined;
let parts: PlatePart[] = [];
// Footprints and sizes of the parts, measured by the first build and reused by every edit after it.
const cache = newPartCache();
let pending: Extract<ToWorker, { type: "build" }> | null = null;
let busy = false;

async function init(msg: Extract<ToWorker, { type: "init" }>) {
  const t0 = performance.now();
  kernel = await loadKernel();
  const ids = Object.keys(ENGRAVING_FONTS) as EngravingFontId[];
  const buffers = await Promise.all(ids.map(async (id) => new Uint8Array(await (await fetch(`/api/fonts/${id}`)).arrayBuffer())));
  fonts = parseFontBook(Object.fromEntries(ids.map((id, i) => [id, buffers[i]!])) as Record<EngravingFontId, Uint8Array>);
  parts = await Promise.all(
    msg.parts.map(async (p) => {
      const res = await fetch(`/api/parts/${p.id}/file`);
      if (!res.ok) throw new Error(`part ${p.name} could not be loaded (HTTP ${res.status})`);
      const bytes = new Uint8Array(await res.arrayBuffer());
      const r = importMesh(bytes, kernel!, {
        fileName: `${p.name}.${res.headers.get("x-part-format") ?? "stl"}`,
        unit: (res.headers.get("x-part-unit") ?? undefined) as Unit | undefined,
      });
      const layFlat = res.headers.get("x-part-lay-flat") === "1" || p.orientation === "lay-flat";
      const mesh = orientMesh(combineMeshes(r.bodies.map((b) => b.mesh)), {
        layFlat,
        turnX: p.orientation === "turned" ? 2 : 0,
        rotateZ: p.rotation,
      });
      return { id: p.id, name: p.name, mesh, quantity: p.quantity };
    }),
  );
  const display = parts.map((p) => decimate(p));
  post(
    {
      type: "ready",
      ms: performance.now() - t0,
      triangles: parts.reduce((s, p) => s + p.quantity * (p.mesh.triVerts.length / 3), 0),
      parts: display,
    },
    display.flatMap((d) => [d.positions.buffer, d.indices.buffer]) as ArrayBuffer[],
  );
}

/** Above this many triangles a part is shown simplified, within 0.02 mm of its surface. */
const DISPLAY_TRIANGLES = 5000;
const DISPLAY_TOLERANCE = 0.02;

function decimate(p: PlatePart): DisplayPart {
  const triangles = p.mesh.triVerts.length / 3;
  if (triangles <= DISPLAY_TRIANGLES)
    return { id: p.id, positions: p.mesh.vertProperties.slice(), indices: p.mesh.triVerts.slice(), triangles, shownTriangles: triangles };
  const scope = kernel!.scope();
  try {
    const { Manifold, Mesh } = kernel!.wasm;
    const solid = scope.track(new Manifold(new Mesh({ numProp: 3, vertProperties: p.mesh.vertProperties, triVerts: p.mesh.triVerts })));
    const m = scope.track(solid.simplify(DISPLAY_TOLERANCE)).getMesh();
    const positions = new Float32Array(m.numVert * 3);
    for (let i = 0; i < m.numVert; i++) for (let a = 0; a < 3; a++) positions[i * 3 + a] = m.vertProperties[i * m.numProp + a]!;
    return { id: p.id, positions, indices: m.triVerts.slice(), triangles, shownTriangles: m.triVerts.length / 3 };
  } finally {
    scope.close();
  }
}

/** Build the newest request only: edits that arrive while a build runs replace each other. */
function pump() {
  if (busy || !pending || !kernel || !fonts) return;
  const msg = pending;
  pending = null;
  busy = true;
  try {
    const t0 = performance.now();
    const r = buildPlate(kernel, { parts, options: msg.options, fonts, variables: msg.variables, formats: [], cache, markOutlines: true });
    // Only the slab is sent: the view already holds the parts and places them from `pieces`.
    const s = r.bodies?.find((b) => b.piece === undefined);
    const slab = s ? { name: s.name, positions: s.mesh.vertProperties, indices: s.mesh.triVerts } : null;
    post(
      {
        type: "built",
        seq: msg.seq,
        ms: performance.now() - t0,
        slab,
        pieces: r.pieces,
        layout: r.layout,
        tried: r.tried ?? null,
        findings: r.findings,
        estimates: r.estimates,
      },
      slab ? ([slab.positions.buffer, slab.indices.buffer] as ArrayBuffer[]) : [],
    );
  } catch (err) {
    post({
      type: "error",
      seq: msg.seq,
      message: err instanceof MeshImportError ? err.message : err instanceof Error ? err.message : String(err),
    });
  } finally {
    busy = false;
    if (pending) setTimeout(pump, 0);
  }
}

self.onmessage = (e: MessageEvent<ToWorker>) => {
  const msg = e.data;
  if (msg.type === "init") {
    init(msg)
      .then(pump)
      .catch((err: unknown) => post({ type: "error", message: err instanceof Error ? err.message : String(err) }));
  } else {
    pending = msg;
    pump();
  }
};
