/// <reference lib="webworker" />
import { buildPlate, type PlatePart } from "@/lib/geometry/build-plate";
import { MeshImportError } from "@/lib/geometry/errors";
import { ENGRAVING_FONTS, parseFontBook, type EngravingFontId, type FontBook } from "@/lib/geometry/fonts";
import { importMesh } from "@/lib/geometry/import";
import type { Unit } from "@/lib/geometry/io/raw";
import { loadKernel, type Kernel } from "@/lib/geometry/kernel";
import { combineMeshes, type IndexedMesh } from "@/lib/geometry/mesh";
import { orientMesh } from "@/lib/geometry/orient";
import type { FromWorker, ToWorker } from "./protocol";

const post = (m: FromWorker, transfer: Transferable[] = []) => (self as unknown as DedicatedWorkerGlobalScope).postMessage(m, transfer);

let kernel: Kernel | undefined;
let fonts: FontBook | undefined;
let parts: PlatePart[] = [];
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
      const r = importMesh(bytes, kernel!, { fileName: `${p.name}.${res.headers.get("x-part-format") ?? "stl"}`, unit: (res.headers.get("x-part-unit") ?? undefined) as Unit | undefined });
      const layFlat = res.headers.get("x-part-lay-flat") === "1" || p.orientation === "lay-flat";
      const mesh = orientMesh(combineMeshes(r.bodies.map((b) => b.mesh)), { layFlat, turnX: p.orientation === "turned" ? 2 : 0, rotateZ: p.rotation });
      return { id: p.id, name: p.name, mesh, quantity: p.quantity };
    }),
  );
  post({ type: "ready", ms: performance.now() - t0, triangles: parts.reduce((s, p) => s + p.mesh.triVerts.length / 3, 0) });
}

/** Build the newest request only: edits that arrive while a build runs replace each other. */
function pump() {
  if (busy || !pending || !kernel || !fonts) return;
  const msg = pending;
  pending = null;
  busy = true;
  try {
    const t0 = performance.now();
    const r = buildPlate(kernel, { parts, options: msg.options, fonts, variables: msg.variables, formats: [] });
    // Pieces share their part's index array: copy it, since what is sent is handed over (transferred).
    const bodies = (r.bodies ?? []).map((b) => ({ name: b.name, piece: b.piece, positions: b.mesh.vertProperties.slice(), indices: b.mesh.triVerts.slice() }));
    post(
      { type: "built", seq: msg.seq, ms: performance.now() - t0, bodies, pieces: r.pieces, layout: r.layout, findings: r.findings, estimates: r.estimates },
      bodies.flatMap((b) => [b.positions.buffer, b.indices.buffer]).filter((buf, i, all) => all.indexOf(buf) === i) as ArrayBuffer[],
    );
  } catch (err) {
    post({ type: "error", seq: msg.seq, message: err instanceof MeshImportError ? err.message : err instanceof Error ? err.message : String(err) });
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
