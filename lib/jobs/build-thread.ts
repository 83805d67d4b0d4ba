/**
 * One build in a worker thread (run by piscina from the worker process). Each thread holds its own
 * kernel and fonts, loaded once. The thread ends itself after a number of builds, or after any build
 * that hit the WASM memory limit, so its memory (which WebAssembly never gives back) is renewed.
 */
import { readFileSync } from "node:fs";
import { stripImportExtension } from "@/lib/geometry/formats";
import { env } from "@/lib/env";
import os from "node:os";
import path from "node:path";
import { deflateRawSync, inflateRaw, inflateRawSync } from "node:zlib";
import { buildPlate, newPartCache, type PlateResult } from "@/lib/geometry/build-plate";
import type { Finding } from "@/lib/geometry/checks";
import { hexTile } from "@/lib/geometry/demo-shapes";
import { MeshImportError } from "@/lib/geometry/errors";
import { ENGRAVING_FONTS, parseFontBook, type EngravingFontId } from "@/lib/geometry/fonts";
import { importMesh } from "@/lib/geometry/import";
import type { Unit } from "@/lib/geometry/io/raw";
import { loadKernel, type Kernel } from "@/lib/geometry/kernel";
import { bounds, combineMeshes, type IndexedMesh } from "@/lib/geometry/mesh";
import { parseOptions, type SlabOptionsInput } from "@/lib/geometry/options";
import { unitFindings, type ReadPart } from "@/lib/geometry/units";
import { orientMesh } from "@/lib/geometry/orient";
import { fillValue, provePlateAsync, type Proof } from "@/lib/proof";
import { countEdgesOffThread, readThreeMfOffThread } from "./proof-thread";
import { draftParts, type PartDraft, type PartUploadTask } from "@/lib/parts/measure";
import { blobStore, BlobNotFoundError } from "@/lib/storage";
import { decodePrepared, encodePrepared, PreparedPartError } from "@/lib/geometry/prepared";
import { preparedSource, type PreparedReading } from "@/lib/parts/prepared-source";
import { findPreparation, savePreparation } from "@/db/queries/preparations";
import { blobUses } from "@/db/queries/blobs";

export type BuildTask = {
  /** Parts by blob key; `bytes` may be left out, and the thread reads the blob itself unless it holds the part already. */
  parts: {
    name: string;
    blobKey: string;
    bytes?: Uint8Array;
    quantity: number;
    unit?: string;
    layFlat?: boolean;
    turned?: boolean;
    rotation?: number;
    partId?: string;
  }[];
  options: SlabOptionsInput;
  variables: Record<string, string>;
  title: string;
  /** A template's top view: stand-in pieces instead of `parts`, the marks' outlines, no files. */
  sample?: boolean;
};

/** A plate file the thread stored itself (hashed and written here, so only its key travels back). */
export type StoredFile = { format: "stl" | "3mf"; key: string; bytes: number };

export type BuildOutcome =
  | { ok: true; result: Omit<PlateResult, "bodies">; proof?: Proof; files?: StoredFile[] }
  | { ok: false; code: string; message: string; details?: unknown };

// Builds and imports are batch work: on Linux a thread's nice value is its own, so each pool thread
// lowers its own priority and the web process (and the worker's queue loop) keep the CPU they need
// when they share a machine with it (common practice for batch workers). SLAB_THREAD_NICE=0 turns it off.
try {
  os.setPriority(env().SLAB_THREAD_NICE);
} catch {
  // not permitted here: run at normal priority
}

const MAX_BUILDS = env().SLAB_THREAD_MAX_BUILDS;
let builds = 0;
let kernel: Promise<Kernel> | undefined;
let fonts: ReturnType<typeof parseFontBook> | undefined;
/**
 * Parts already read and oriented by this thread, by content key and reading: an order system sends
 * the same kit again and again, and importing (weld + kernel check) costs more than the build itself.
 */
type Held = {
  mesh: IndexedMesh;
  shells: number;
  read: Pick<ReadPart, "unit" | "warnings" | "size">;
  /** Its prepared blob's source key (lib/geometry/prepared.ts), and the layer heights that blob holds. */
  source: string;
  stored: Set<number>;
};
const meshCache = new Map<string, Held>();
const CACHE_ENTRIES = 64;
/** Their measures (footprints, size, volume), kept while the mesh stays in the cache above. */
const partCache = newPartCache();

function loadFonts() {
  const dir = path.join(process.cwd(), "fonts");
  const bytes = Object.fromEntries(Object.entries(ENGRAVING_FONTS).map(([id, f]) => [id, readFileSync(path.join(dir, f.file))])) as Record<
    EngravingFontId,
    Buffer
  >;
  return parseFontBook(bytes);
}

/** Stand-in pieces for a template's top view: four of the demo hex tiles (our own invented shape). */
let sample: IndexedMesh | undefined;
function samplePieces() {
  sample ??= orientMesh(hexTile());
  return [{ id: "sample", name: "Sample piece", mesh: sample, quantity: 4 }];
}

/**
 * Tests only: a plate whose values hold `proof_tamper: "turn-triangle"` has the STL's first triangle
 * turned over between the build and its proof, to show that a plate whose files are wrong is never
 * stored as ready. Honoured only when NODE_ENV is exactly "test", which only `npm test` sets
 * (scripts/test.mjs); `npm start` and any production worker never run with it, so there the value is
 * just an unused variable.
 */
function tamperForTest(result: { stl?: Uint8Array }, variables: Record<string, string>) {
  if (env().NODE_ENV !== "test" || variables.proof_tamper !== "turn-triangle" || !result.stl) return;
  const stl = result.stl.slice();
  // Swap the second and third corners of facet 0 (12 bytes each, after the 12-byte normal).
  const b = stl.slice(84 + 24, 84 + 36);
  stl.copyWithin(84 + 24, 84 + 36, 84 + 48);
  stl.set(b, 84 + 36);
  result.stl = stl;
}

/** A part read and measured by an earlier build (any thread, any worker), from the blob store; null when none is kept or readable. */
async function preparedHeld(reading: PreparedReading): Promise<Held | null> {
  const source = preparedSource(reading);
  // Kept preparations are an optimisation: a database that cannot answer costs the reading, not the build.
  const row = await findPreparation(source).catch((err: unknown) => {
    console.warn(`[build] kept preparations not looked up: ${err instanceof Error ? err.message.split("\n")[0] : String(err)}`);
    return null;
  });
  if (!row) return null;
  try {
    const prepared = decodePrepared(await blobStore().get(row.blobKey));
    partCache.parts.set(prepared.mesh, new Map(prepared.measures));
    return { mesh: prepared.mesh, shells: prepared.shells, read: prepared.read, source, stored: new Set(prepared.measures.keys()) };
  } catch (err) {
    // A blob gone or unreadable costs the reading again, not the build.
    if (err instanceof BlobNotFoundError || err instanceof PreparedPartError) return null;
    throw err;
  }
}

/** Read a part's file as the build asks (units, lay flat, turned, rotation): the import with its weld and kernel checks. */
async function readPart(k: Kernel, p: BuildTask["parts"][number], reading: PreparedReading): Promise<Held> {
  const bytes = p.bytes ?? (await blobStore().get(p.blobKey));
  const imported = importMesh(bytes, k, { fileName: p.name, unit: p.unit as Unit | undefined });
  const mesh = orientMesh(combineMeshes(imported.bodies.map((b) => b.mesh)), {
    layFlat: p.layFlat,
    turnX: p.turned ? 2 : 0,
    rotateZ: p.rotation ?? 0,
  });
  const b = bounds(mesh);
  return {
    mesh,
    shells: imported.bodies.reduce((s, x) => s + x.shells, 0),
    read: { unit: imported.unit, warnings: imported.warnings, size: [b.max[0] - b.min[0], b.max[1] - b.min[1], b.max[2] - b.min[2]] },
    source: preparedSource(reading),
    stored: new Set(),
  };
}

/**
 * Store the preparation of every part this build measured at a layer height its kept blob does not
 * hold yet. Keeping is an optimisation: when it fails (the database or the store is away), the build
 * still stands and the next one measures again.
 */
async function keepPrepared(list: { held: Held; blobKey: string }[]): Promise<void> {
  const seen = new Set<Held>();
  for (const { held, blobKey } of list) {
    if (seen.has(held)) continue;
    seen.add(held);
    const measures = partCache.parts.get(held.mesh);
    if (!measures || [...measures.keys()].every((h) => held.stored.has(h))) continue;
    try {
      const bytes = encodePrepared({ mesh: held.mesh, shells: held.shells, read: held.read, measures });
      const stored = await blobStore().put(bytes);
      const replaced = await savePreparation({
        source: held.source,
        partBlobKey: blobKey,
        blobKey: stored.key,
        bytes: bytes.byteLength,
        layerHeights: [...measures.keys()].sort((a, b) => a - b),
      });
      held.stored = new Set(measures.keys());
      if (replaced && (await blobUses(replaced)) === 0) await blobStore().delete(replaced);
    } catch (err) {
      console.warn(`[build] a prepared part was not kept: ${err instanceof Error ? err.message : String(err)}`);
    }
  }
}

function retire() {
  // Let piscina deliver this answer first, then end the thread; piscina starts a fresh one.
  setTimeout(() => process.exit(0), 50);
}

export type PartUploadOutcome =
  { ok: true; drafts: PartDraft[]; blobs: string[] } | { ok: false; code: string; message: string; details?: Record<string, unknown> };

/**
 * An uploaded file read into library parts (piscina's `importPart` task): the import runs here,
 * never in the web process, with the same kernel and the same thread recycling as builds.
 */
export async function importPart(task: PartUploadTask): Promise<PartUploadOutcome> {
  kernel ??= loadKernel();
  const k = await kernel;
  try {
    const bytes = await blobStore().get(task.blobKey);
    return { ok: true, ...(await draftParts(k, bytes, task, (b) => blobStore().put(b))) };
  } catch (err) {
    if (err instanceof MeshImportError) return { ok: false, code: err.code, message: err.plain, details: err.details };
    if (err instanceof WebAssembly.RuntimeError || (err instanceof RangeError && /memory/i.test(err.message))) {
      retire();
      return {
        ok: false,
        code: "out_of_memory",
        message: "The file is too large to check in one go (the geometry kernel ran out of memory); simplify the mesh first.",
      };
    }
    throw err;
  } finally {
    if (++builds >= MAX_BUILDS) retire();
  }
}

export default async function build(task: BuildTask): Promise<BuildOutcome> {
  kernel ??= loadKernel();
  fonts ??= loadFonts();
  const k = await kernel;
  try {
    if (task.sample) {
      const { bodies: _b, ...result } = buildPlate(k, {
        parts: samplePieces(),
        options: task.options,
        fonts,
        variables: task.variables,
        formats: [],
        cache: partCache,
        markOutlines: true,
      });
      return { ok: true, result };
    }
    const parts = [];
    // How many closed shells each part is (the importer's bodies, joined into one mesh): the proof
    // counts a part of several bodies, or a hollow one, shell for shell.
    const shellsOf = new Map<string, number>();
    const unitNotes: Finding[] = [];
    const heldParts: { held: Held; blobKey: string }[] = [];
    const bed = parseOptions(task.options).layout.bed;
    for (const [i, p] of task.parts.entries()) {
      const cacheKey = `${p.blobKey}|${p.unit ?? ""}|${p.layFlat ? 1 : 0}|${p.turned ? 1 : 0}|${p.rotation ?? 0}`;
      let held = meshCache.get(cacheKey);
      if (!held) {
        const reading: PreparedReading = { blobKey: p.blobKey, unit: p.unit, layFlat: p.layFlat, turned: p.turned, rotation: p.rotation };
        held = (await preparedHeld(reading)) ?? (await readPart(k, p, reading));
        if (meshCache.size >= CACHE_ENTRIES) meshCache.delete(meshCache.keys().next().value!);
        meshCache.set(cacheKey, held);
      }
      heldParts.push({ held, blobKey: p.blobKey });
      // The importer's unit warning, and a refusal for a part too small to print or too large for the bed (the unit is likely wrong).
      unitNotes.push(...unitFindings({ ...held.read, index: i + 1, name: p.name, source: p.partId ? "library" : "upload" }, bed));
      parts.push({ id: `part-${i + 1}`, name: stripImportExtension(p.name), mesh: held.mesh, quantity: p.quantity });
      shellsOf.set(`part-${i + 1}`, held.shells);
    }
    if (unitNotes.some((f) => f.severity === "error")) {
      // Refused before building: a plate of wrongly scaled parts is not worth its booleans.
      return {
        ok: true,
        result: { pieces: [], layout: null, findings: unitNotes, estimates: null, stats: { triangles: 0, bodies: 0, timings: {} } },
      };
    }
    const { bodies: _bodies, ...result } = buildPlate(k, {
      parts,
      options: task.options,
      fonts,
      variables: task.variables,
      formats: ["stl", "3mf"],
      cache: partCache,
      markOutlines: true,
      title: task.title,
      deflateRaw: (d) => deflateRawSync(d, { level: 1 }),
    });
    if (unitNotes.length) result.findings = [...unitNotes, ...result.findings];
    // Parts measured here for the first time (or at a new layer height) are kept for every later build.
    await keepPrepared(heldParts);
    if (!result.stl || !result.threeMf) return { ok: true, result };
    // The proof reads the files exactly as they will be stored, here in the thread (the worker's main
    // thread stays free for the queue).
    tamperForTest(result, task.variables);
    const options = parseOptions(task.options);
    // The 3MF is read and the STL's edges counted on the proof's second thread while the rest of the
    // STL is checked here; should that thread fail, its work is done here instead (node:zlib inflating
    // into one output buffer of the size the zip directory states, one byte more so zlib ends there).
    const chunk = (size?: number) => (size ? { chunkSize: Math.max(64, size + 1) } : {});
    const proof = await provePlateAsync({
      stl: result.stl,
      threeMf: result.threeMf,
      readThreeMf: readThreeMfOffThread,
      countEdges: countEdgesOffThread,
      inflateRaw: (d, size) => inflateRawSync(d, chunk(size)),
      inflateRawAsync: (d, size) =>
        new Promise((resolve, reject) => inflateRaw(d, chunk(size), (err, out) => (err ? reject(err) : resolve(out)))),
      options,
      pieces: result.pieces.length,
      // The value asked for: the option with the plate's values filled ({date} as the build fills it).
      qrValue: options.marks.qr
        ? fillValue(options.marks.qr.value, { date: new Date().toISOString().slice(0, 10), ...task.variables })
        : undefined,
      marks: result.layout?.marks,
      labels: result.pieces.map((p) => ({ number: p.number, bounds: p.bounds })),
      shells: result.pieces.map((p) => shellsOf.get(p.partId) ?? 1),
    });
    if (!proof.ok || result.findings.some((f) => f.severity === "error")) return { ok: true, result, proof };
    // A proven plate's files are hashed and written here, not on the worker's main thread, and only
    // their keys go back to it (not tens of megabytes copied between threads).
    const written: [StoredFile["format"], Uint8Array][] = [
      ["stl", result.stl],
      ["3mf", result.threeMf],
    ];
    const files = await Promise.all(
      written.map(async ([format, bytes]) => ({ format, key: (await blobStore().put(bytes)).key, bytes: bytes.byteLength })),
    );
    delete result.stl;
    delete result.threeMf;
    return { ok: true, result, proof, files };
  } catch (err) {
    if (err instanceof MeshImportError) return { ok: false, code: err.code, message: err.message, details: err.details };
    if (err instanceof WebAssembly.RuntimeError || (err instanceof RangeError && /memory/i.test(err.message))) {
      retire();
      return {
        ok: false,
        code: "out_of_memory",
        message: "The plate is too large to build in one go (the geometry kernel ran out of memory). Split the kit over more plates.",
      };
    }
    if (err instanceof Error && err.name === "ZodError") return { ok: false, code: "invalid_options", message: err.message };
    throw err;
  } finally {
    if (++builds >= MAX_BUILDS) retire();
  }
}
