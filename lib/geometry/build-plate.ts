import type { CrossSection, Manifold } from "manifold-3d";
import { cornerFinding, doesNotFit, logoTooComplex, markDepths, pieceNumbersMismatch, roomForValues, unknownSlots } from "./build-checks";
import { runChecks, type Finding } from "./checks";
import { estimate, type Estimates } from "./estimates";
import { EXPORT_FORMAT_IDS, type ExportFormatId } from "./formats";
import type { FontBook } from "./fonts";
import { write3mf } from "./io/3mf-write";
import { writeBinaryStl } from "./io/stl-write";
import type { DeflateRaw } from "./io/zip-write";
import { withScope, type Kernel } from "./kernel";
import {
  bandFrame,
  markBands,
  nestedFrame,
  markList,
  markShapes,
  moveMarks,
  numberGlyphs,
  numberWidth,
  placeMarks,
  type MarkPlaces,
} from "./mark-bands";
import { allReliefs, markReliefs, reliefOutlines, type Reliefs } from "./mark-reliefs";
import type { Contour } from "./marks/text";
import type { IndexedMesh } from "./mesh";
import { parseOptions, slicedGap, type SlabOptions, type SlabOptionsInput } from "./options";
import { numberPieces, pieceBoxes, pieceRoom, placePieces, triedPlacement, type TriedLayout } from "./piece-layout";
import {
  checkedPieces,
  kitPieces,
  kitSize,
  measureParts,
  movePieces,
  pieceBounds,
  pieceInSlot,
  pieceLift,
  pieceMeshes,
  placedPieces,
  placedShadow,
  type PartCache,
  type Piece,
  type PlacedPiece,
  type PlatePart,
} from "./pieces";
import { Laps, type Box, type PlateContext } from "./plate-context";
import type { SlabShape } from "./slab";
import { slabAround, slabSolid } from "./slab-solid";
import { fitTextLines } from "./text-fit";
import { unfilledPlaceholders } from "./variables";

export { newPartCache, placeMesh, type PartCache, type PartMeasure, type PlacedPiece, type PlatePart } from "./pieces";
export type { TriedLayout } from "./piece-layout";

export type BuildInput = {
  parts: PlatePart[];
  options?: SlabOptionsInput | SlabOptions;
  fonts: FontBook;
  variables?: Record<string, string>;
  /** Files to write; none for a preview or a check-only build. */
  formats?: ExportFormatId[];
  title?: string;
  deflateRaw?: DeflateRaw;
  /**
   * Parts measured by earlier builds (footprints, size, volume), kept as plain data keyed by the mesh
   * object: the slab editor and the worker threads keep their parts' meshes between builds, so a
   * change of options re-measures nothing.
   */
  cache?: PartCache;
  /** Return the marks' outlines in `layout.markOutlines` (for top views). */
  markOutlines?: boolean;
  /** For benchmarks: sees the slab and its cutters just before the one n-ary difference. */
  hooks?: { beforeBooleans?: (slab: Manifold, cutters: Manifold[]) => void };
};

export type PlateLayout = {
  slab: { shape: SlabShape; width: number; depth: number; outline: Contour[]; thickness: number };
  bed: { width: number; depth: number };
  /** With `markOutlines` asked for: every mark's outline on the slab (mm, y up). */
  markOutlines?: Contour[];
  utilisation: number;
  marks: { kind: "text" | "qr" | "logo"; value: string; bounds: Box }[];
};

export type PlateResult = {
  stl?: Uint8Array;
  threeMf?: Uint8Array;
  pieces: PlacedPiece[];
  layout: PlateLayout | null;
  findings: Finding[];
  estimates: Estimates | null;
  stats: { triangles: number; bodies: number; timings: Record<string, number> };
  /**
   * What a slicer will make of the slab and the gap at the chosen layer heights, and the floor left
   * under the deepest engraving (mm).
   */
  slicing?: { slabTop: number; pieceBase: number; gap: number; gapLayers: number; minFloor: number };
  /** When the pieces do not fit the bed: where they were tried, and what reaches past it (for the plate map). */
  tried?: TriedLayout;
  /** Kernel-free meshes of every body, for a preview. */
  bodies?: { name: string; mesh: IndexedMesh; piece?: number }[];
};

/**
 * The one entry point: parts and options in, a print-ready plate out. Every kernel object it makes is
 * tracked in one scope and freed before it returns, whatever happens.
 */
export function buildPlate(kernel: Kernel, input: BuildInput): PlateResult {
  const laps = new Laps();
  const options = parseOptions(input.options ?? {});
  // {date} is today's date unless the caller fills it (ISO 8601, unambiguous on a label).
  const vars = { date: new Date().toISOString().slice(0, 10), ...input.variables };
  return withScope(kernel, (scope) => build({ kernel, scope, options, fonts: input.fonts, vars, input, laps }));
}

/** What every step reads, the caller's input, and the laps that time the stages (`stats.timings`). */
type BuildContext = PlateContext & { input: BuildInput; laps: Laps };

/** The build, step by step; an error finding stops it at the step that raised it. */
function build(ctx: BuildContext): PlateResult {
  const { input, laps, options: o, scope } = ctx;
  const findings: Finding[] = [];
  const refuse = (...more: Finding[]): PlateResult => {
    findings.push(...more);
    return { pieces: [], layout: null, findings, estimates: null, stats: { triangles: 0, bodies: 0, timings: laps.timings } };
  };

  // 1–2. Parts measured, their pieces, the marks' shapes and the room they take.
  const staged = piecesAndBands(ctx, input, findings);
  if (!staged) return refuse();
  const { measures, pieces, room, shapes, bands } = staged;

  // 3. The pieces on the bed (where placed by hand, else packed), then numbered.
  const placing = placePieces(ctx, pieces, room, bands, input.cache?.nests);
  laps.lap("layout");
  if (!placing.fits) return { ...refuse(...doesNotFit(o, placing)), tried: triedPlacement(o, pieces, room, bands) };
  const numbersAsked = pieceNumbersMismatch(o.layout.pieceNumbers, pieces.length);
  if (numbersAsked) return refuse(numbersAsked);
  const numberOf = numberPieces(
    pieces.map((p) => ({ slot: p.slot, box: pieceBounds(p) })),
    o.layout.pieceNumbers,
    o.layout.firstNumber,
  );
  const glyphs = numberGlyphs(ctx, pieces, numberOf, room);

  // 4. The bands below and above the pieces, the slab's outline round everything, all moved to sit from (0, 0).
  const boxes = pieceBoxes(pieces, room, glyphs);
  const frame = placing.bandsAt ? nestedFrame(bands, placing.bandsAt) : bandFrame(o, boxes, bands, room.spacing);
  const places = placeMarks(o, shapes, bands, frame, room.spacing);
  const slab = slabAround(ctx, {
    pieces,
    pieceBoxes: boxes,
    glyphBoxes: [...glyphs.values()].map((g) => g.box),
    markBoxes: markList(places).map((mk) => mk.bounds),
    ext: room.ext,
  });
  if (slab.corners) findings.push(cornerFinding(o, slab.corners));
  movePieces(pieces, slab.dx, slab.dy);
  moveMarks(places, glyphs, slab.dx, slab.dy);
  laps.lap("slab outline");

  // 5. Every mark at its depth as a region to engrave or emboss; the pieces as placed on the slab.
  const { depths, findings: depthFindings } = markDepths(o, places, shapes.logo);
  findings.push(...depthFindings);
  const shadows = pieces.map((p) => placedShadow(scope, p));
  const reliefs = markReliefs(ctx, { places, logo: shapes.logo, depths, pieces, shadows, glyphs, numberOf });
  const placed = placedPieces(pieces, { numberOf, shadows, glyphs, z: pieceLift(o, depths.ring) });
  const markOutlines = input.markOutlines ? reliefOutlines(ctx, reliefs) : undefined;
  laps.lap("marks");

  // 6. The plate's checks, before the expensive booleans: an error stops the build here.
  findings.push(
    ...runChecks(ctx.kernel, scope, {
      options: o,
      slab: slab.outline,
      slabSize: { width: slab.width, depth: slab.depth },
      pieces: checkedPieces(pieces, numberOf, shadows, room.ext),
      marks: reliefs.regions,
      allMarks: allReliefs(reliefs),
      texts: places.texts,
      qr: places.qr,
      unfilled: [...shapes.texts.map((t) => t.value), shapes.qr?.value ?? ""].flatMap(unfilledPlaceholders),
      solids: input.parts.map((p, i) => ({ partId: p.id, name: p.name, size: measures[i]!.size, smallParts: measures[i]!.smallParts })),
    }),
  );
  laps.lap("checks");
  const slicing = slicingOf(o, reliefs);
  const layout = plateLayout(o, slab, pieces, places, markOutlines);
  if (findings.some((f) => f.severity === "error")) {
    return { pieces: placed, layout, findings, estimates: null, stats: { triangles: 0, bodies: 0, timings: laps.timings }, slicing };
  }

  // 7. The slab solid, the pieces' meshes beside it, the files.
  const solid = slabSolid(ctx, slab.outline, reliefs, input.cache?.slabs, input.hooks?.beforeBooleans);
  laps.lap("slab booleans");
  const bodies: NonNullable<PlateResult["bodies"]> = [
    { name: "Slab", mesh: solid.mesh },
    ...pieceMeshes(placed, pieces).map(({ piece, mesh }) => ({ name: `${piece.number} · ${piece.partName}`, mesh, piece: piece.number })),
  ];
  laps.lap("pieces");
  const { stl, "3mf": threeMf } = plateFiles(
    ctx,
    bodies,
    `${placed.length} pieces on a ${o.slab.thickness} mm slab, ${o.slab.gap} mm air gap`,
  );
  const estimates = estimate(
    o,
    solid.volume,
    placed.map((p) => ({ number: p.number, volume: measures[pieceInSlot(pieces, p.slot).partIndex]!.volume })),
  );
  const triangles = bodies.reduce((s, b) => s + b.mesh.triVerts.length / 3, 0);
  return {
    stl,
    threeMf,
    pieces: placed,
    layout,
    findings,
    estimates,
    stats: { triangles, bodies: bodies.length, timings: laps.timings },
    slicing,
    bodies,
  };
}

/**
 * The build's first steps, shared with planning a kit over plates (plans.ts): 1. parts measured
 * once (or taken from the cache), their pieces in kit order (the plate's own, with layout.pieces);
 * 2. the marks' shapes, each text line fitted to its room (shrunk, or refused), and the room they
 * and the numbers take around the pieces. Null, with the findings, when the build stops here.
 */
export function piecesAndBands(ctx: PlateContext & { laps?: Laps }, input: BuildInput, findings: Finding[]) {
  const o = ctx.options;
  const { measures, footprints } = measureParts(ctx, input.parts, input.cache);
  ctx.laps?.lap("footprints");
  const unknown = unknownSlots(o, kitSize(o, input.parts));
  if (unknown) {
    findings.push(unknown);
    return null;
  }
  const pieces = kitPieces(o, input.parts, footprints);
  const laidOut = markShapes(ctx);
  const complex = logoTooComplex(laidOut.logo);
  if (complex) {
    findings.push(complex);
    return null;
  }
  findings.push(...roomForValues(laidOut));
  const room = pieceRoom(o, numberWidth(ctx, o.layout.firstNumber - 1 + kitSize(o, input.parts)));
  const fitted = fitTextLines(ctx, laidOut, room.spacing);
  findings.push(...fitted.findings);
  if (fitted.findings.some((f) => f.severity === "error")) return null;
  const shapes = fitted.shapes;
  const bands = markBands(shapes, room.spacing);
  ctx.laps?.lap("marks layout");
  return { measures, pieces, room, shapes, bands };
}

/** The plate as laid out, for the plate map, previews and the API (kernel-free). */
function plateLayout(
  o: SlabOptions,
  slab: { outline: CrossSection; width: number; depth: number },
  pieces: Piece[],
  places: MarkPlaces,
  markOutlines?: Contour[],
): PlateLayout {
  return {
    slab: { shape: o.slab.shape, width: slab.width, depth: slab.depth, outline: slab.outline.toPolygons(), thickness: o.slab.thickness },
    bed: o.layout.bed,
    ...(markOutlines ? { markOutlines } : {}),
    utilisation: pieces.reduce((s, p) => s + p.fp.shadowArea, 0) / slab.outline.area(),
    marks: markList(places),
  };
}

/** What a slicer makes of the slab and the gap (options.ts), and the floor left under the deepest engraving. */
function slicingOf(o: SlabOptions, reliefs: Reliefs): NonNullable<PlateResult["slicing"]> {
  const sliced = slicedGap(o);
  return {
    slabTop: sliced.slabTop,
    pieceBase: sliced.pieceBase,
    gap: sliced.gap,
    gapLayers: sliced.layers,
    minFloor: o.slab.thickness - Math.max(0, ...reliefs.engrave.keys()),
  };
}

type FileBody = NonNullable<PlateResult["bodies"]>[number];
type Writer = (bodies: FileBody[], ctx: BuildContext, description: string) => Uint8Array;

/** Each export format's writer (formats.ts lists the formats; a new one does not compile without its writer here). */
const WRITERS: Record<ExportFormatId, Writer> = {
  stl: (bodies) => writeBinaryStl(bodies.map((b) => b.mesh)),
  "3mf": (bodies, { input, vars }, description) =>
    write3mf(
      bodies.map((b) => ({ name: b.name, mesh: b.mesh, partNumber: b.piece ? String(b.piece) : "slab" })),
      {
        title: input.title ?? "Slabwright plate",
        description,
        // The plate's own day ({date}), so the same inputs give the same bytes on any later day.
        ...(/^\d{4}-\d{2}-\d{2}$/.test(vars.date ?? "") ? { creationDate: new Date(`${vars.date}T00:00:00Z`) } : {}),
      },
      input.deflateRaw,
    ),
};

/** The files asked for in `formats` (in the registry's order), each timed as its own stage. */
function plateFiles(ctx: BuildContext, bodies: FileBody[], description: string): Partial<Record<ExportFormatId, Uint8Array>> {
  const asked = new Set(ctx.input.formats ?? []);
  const files: Partial<Record<ExportFormatId, Uint8Array>> = {};
  for (const f of EXPORT_FORMAT_IDS) {
    if (!asked.has(f)) continue;
    files[f] = WRITERS[f](bodies, ctx, description);
    ctx.laps.lap(f);
  }
  return files;
}
