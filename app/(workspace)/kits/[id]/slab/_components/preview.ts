import type { PlacedPiece, PlateLayout, TriedLayout } from "@/lib/geometry/build-plate";
import type { Finding } from "@/lib/geometry/checks";
import type { Estimates } from "@/lib/geometry/estimates";
import type { Body, FromWorker } from "./protocol";

/**
 * What the editor shows of the newest preview build. `pieces`, findings and estimates are always the
 * newest build's; `slab`, `viewPieces` (the pieces the 3D view places on it) and `layout` are the
 * newest that built, so a change the checks refuse leaves the last good slab in view, marked stale.
 * `tried` is the newest build's when its pieces did not fit the bed (what the plate map shows then).
 */
export type Preview = {
  slab: Body | null;
  viewPieces: PlacedPiece[];
  stale: boolean;
  pieces: PlacedPiece[];
  layout: PlateLayout | null;
  tried: TriedLayout | null;
  findings: Finding[];
  estimates: Estimates | null;
  ms: number;
  seq: number;
};

export function mergePreview(prev: Preview | null, m: Extract<FromWorker, { type: "built" }>): Preview {
  return {
    slab: m.slab ?? prev?.slab ?? null,
    // A build stopped by an error finding has no geometry: keep showing the last slab that built.
    stale: !m.slab && Boolean(prev?.slab),
    pieces: m.pieces,
    viewPieces: m.slab || !prev ? m.pieces : prev.viewPieces,
    layout: m.layout ?? prev?.layout ?? null,
    tried: m.tried,
    findings: m.findings,
    estimates: m.estimates,
    ms: m.ms,
    seq: m.seq,
  };
}
