import type { PlacedPiece, PlateLayout, TriedLayout } from "@/lib/geometry/build-plate";
import type { Finding } from "@/lib/geometry/checks";
import type { Estimates } from "@/lib/geometry/estimates";
import type { Body, FromWorker } from "./protocol";

/**
 * What the editor shows of the newest preview build. Findings and estimates are always the newest
 * build's; `slab`, `viewPieces` (the pieces the 3D view places on it) and `layout` are the newest that
 * built, so a change the checks refuse leaves the last good slab in view, marked stale. `pieces` go
 * with `layout`: the newest build's when it laid the plate out (a plate the checks refuse still has its
 * new places), else the last laid-out build's, and `mapStale` says the map is that older plate (a
 * refused text line stops the build before the layout: no layout, no pieces).
 * `tried` is the newest build's when its pieces did not fit the bed (what the plate map shows then).
 */
export type Preview = {
  slab: Body | null;
  viewPieces: PlacedPiece[];
  stale: boolean;
  pieces: PlacedPiece[];
  layout: PlateLayout | null;
  mapStale: boolean;
  tried: TriedLayout | null;
  findings: Finding[];
  estimates: Estimates | null;
  ms: number;
  seq: number;
};

export function mergePreview(prev: Preview | null, m: Extract<FromWorker, { type: "built" }>): Preview {
  const kept = !m.layout && prev?.layout ? prev : null;
  return {
    slab: m.slab ?? prev?.slab ?? null,
    // A build stopped by an error finding has no geometry: keep showing the last slab that built.
    stale: !m.slab && Boolean(prev?.slab),
    pieces: kept ? kept.pieces : m.pieces,
    viewPieces: m.slab || !prev ? m.pieces : prev.viewPieces,
    layout: m.layout ?? prev?.layout ?? null,
    mapStale: Boolean(kept),
    tried: m.tried,
    findings: m.findings,
    estimates: m.estimates,
    ms: m.ms,
    seq: m.seq,
  };
}
