/**
 * Reading an uploaded file into library parts, without the database: run in a build-worker thread
 * (lib/jobs/build-thread.ts) so the web process never parses a mesh. Only the engine and the blob
 * store are used here.
 */
import type { Kernel } from "@/lib/geometry/kernel";
import type { ImportFormatId } from "@/lib/geometry/formats";
import { importMesh } from "@/lib/geometry/import";
import { stem } from "@/lib/geometry/io/stl-read";
import { writeBinaryStl } from "@/lib/geometry/io/stl-write";
import type { Unit } from "@/lib/geometry/io/raw";
import { bounds, combineMeshes, signedVolume, type IndexedMesh } from "@/lib/geometry/mesh";
import { orientMesh } from "@/lib/geometry/orient";
import { topViewSvg } from "@/lib/geometry/thumbnail";

/** Everything the library shows about a part, measured on the mesh as it will stand on the slab. */
export function measure(kernel: Kernel, mesh: IndexedMesh, layFlat: boolean) {
  const oriented = orientMesh(mesh, { layFlat });
  const b = bounds(oriented);
  const thumb = topViewSvg(kernel, oriented);
  return {
    triangles: oriented.triVerts.length / 3,
    sizeX: b.max[0] - b.min[0],
    sizeY: b.max[1] - b.min[1],
    sizeZ: b.max[2] - b.min[2],
    volume: signedVolume(oriented),
    contactArea: thumb.contactArea,
    thumbnailSvg: thumb.svg,
  };
}

export type PartUploadTask = { blobKey: string; fileName: string; split?: boolean; unit?: Unit; layFlat?: boolean };

/** One part row to insert, all but the workspace, the uploader and the id. */
export type PartDraft = {
  name: string;
  format: ImportFormatId;
  blobKey: string;
  byteSize: number;
  unit: string;
  layFlat: boolean;
  bodies: number;
  repairs: string[];
  warnings: { code: string; message: string; suggestion?: { unit: string; scale: number } }[];
} & ReturnType<typeof measure>;

/**
 * Import the stored file and draft its part rows: one part with all its bodies, or with `split` one
 * per body (each stored as its own STL, already in millimetres). Import errors are thrown as
 * MeshImportError for the caller to record. `blobs` lists blobs this call created.
 */
export async function draftParts(
  kernel: Kernel,
  bytes: Uint8Array,
  task: PartUploadTask,
  put: (bytes: Uint8Array) => Promise<{ key: string; created: boolean }>,
): Promise<{ drafts: PartDraft[]; blobs: string[] }> {
  const result = importMesh(bytes, kernel, { fileName: task.fileName, unit: task.unit });
  const layFlat = Boolean(task.layFlat);
  const groups =
    task.split && result.bodies.length > 1
      ? result.bodies.map((b) => ({ name: b.name, meshes: [b.mesh], own: true }))
      : [{ name: stem(task.fileName) || "part", meshes: result.bodies.map((b) => b.mesh), own: false }];
  const drafts: PartDraft[] = [];
  const blobs: string[] = [];
  for (const g of groups) {
    const mesh = combineMeshes(g.meshes);
    let blobKey = task.blobKey;
    let byteSize = bytes.byteLength;
    if (g.own) {
      const data = writeBinaryStl([mesh]);
      const stored = await put(data);
      if (stored.created) blobs.push(stored.key);
      blobKey = stored.key;
      byteSize = data.byteLength;
    }
    drafts.push({
      name: g.name.slice(0, 120),
      format: g.own ? "stl" : result.format,
      blobKey,
      byteSize,
      unit: g.own ? "millimeter" : result.unit,
      layFlat,
      bodies: g.meshes.length,
      repairs: result.repairs.map((r) => r.message),
      warnings: result.warnings,
      ...measure(kernel, mesh, layFlat),
    });
  }
  return { drafts, blobs };
}
