import { describe, expect, it } from "vitest";
import type { PlacedPiece, PlateLayout } from "@/lib/geometry/build-plate";
import type { Finding } from "@/lib/geometry/checks";
import { mergePreview } from "./preview";
import type { Body, FromWorker } from "./protocol";

type Built = Extract<FromWorker, { type: "built" }>;
const slab = (name: string): Body => ({ name, positions: new Float32Array(9), indices: new Uint32Array([0, 1, 2]) });
const piece = (number: number, x: number) => ({ number, slot: number, x, y: 0, rotation: 0 }) as PlacedPiece;
const layout = (width: number) => ({ slab: { width } }) as PlateLayout;
const overlap: Finding = { severity: "error", code: "pieces_overlap", message: "Pieces 1 and 2 overlap.", pieces: [1, 2] };
const built = (seq: number, over: Partial<Built>): Built => ({
  type: "built",
  seq,
  ms: 40,
  slab: null,
  pieces: [],
  layout: null,
  tried: null,
  findings: [],
  estimates: null,
  ...over,
});

describe("the preview across builds", () => {
  it("a build with a slab shows it and its pieces", () => {
    const p = mergePreview(null, built(1, { slab: slab("a"), pieces: [piece(1, 10)], layout: layout(100) }));
    expect(p).toMatchObject({
      slab: { name: "a" },
      stale: false,
      viewPieces: [piece(1, 10)],
      pieces: [piece(1, 10)],
      layout: { slab: { width: 100 } },
      seq: 1,
    });
  });

  // lib/geometry/build-plate.ts: a plate the checks refuse still returns its layout and the pieces'
  // new places (no slab solid); a refused text line stops the build before the layout (no layout, no pieces).
  it("a plate the checks refuse keeps the last slab in view, marked stale, with the new findings and map", () => {
    const good = mergePreview(null, built(1, { slab: slab("a"), pieces: [piece(1, 10)], layout: layout(100) }));
    const refused = mergePreview(good, built(2, { slab: null, pieces: [piece(1, 30)], layout: layout(104), findings: [overlap] }));
    expect(refused.slab?.name).toBe("a");
    expect(refused.stale).toBe(true);
    // The 3D view keeps the pieces that belong to the slab it shows; the map shows the new places.
    expect(refused.viewPieces).toEqual([piece(1, 10)]);
    expect(refused.pieces).toEqual([piece(1, 30)]);
    expect(refused.layout?.slab.width).toBe(104);
    expect(refused.mapStale).toBe(false);
    expect(refused.findings).toEqual([overlap]);
    expect(refused.seq).toBe(2);
    // The next build that works replaces it all and is no longer stale.
    const fixed = mergePreview(refused, built(3, { slab: slab("b"), pieces: [piece(1, 12)], layout: layout(110) }));
    expect(fixed).toMatchObject({ slab: { name: "b" }, stale: false, viewPieces: [piece(1, 12)], layout: { slab: { width: 110 } } });
  });

  it("a build refused before its layout (a text line too long) keeps the last map whole: its layout and its pieces", () => {
    const tooLong: Finding = {
      severity: "error",
      code: "text_too_long",
      message: "Text line 2 is 9.0 mm too long",
      field: ["marks", "text", 1, "value"],
    };
    const good = mergePreview(null, built(1, { slab: slab("a"), pieces: [piece(1, 10), piece(2, 40)], layout: layout(100) }));
    const refused = mergePreview(good, built(2, { slab: null, pieces: [], layout: null, findings: [tooLong] }));
    expect(refused).toMatchObject({ slab: { name: "a" }, stale: true, mapStale: true, layout: { slab: { width: 100 } }, seq: 2 });
    expect(refused.pieces).toEqual([piece(1, 10), piece(2, 40)]);
    expect(refused.viewPieces).toEqual([piece(1, 10), piece(2, 40)]);
    expect(refused.findings).toEqual([tooLong]);
    // A second refusal in a row still has the first good map to show.
    const again = mergePreview(refused, built(3, { slab: null, pieces: [], layout: null, findings: [tooLong] }));
    expect(again).toMatchObject({ mapStale: true, pieces: [piece(1, 10), piece(2, 40)], layout: { slab: { width: 100 } } });
    // The line fixed: the new map, current again.
    const fixed = mergePreview(again, built(4, { slab: slab("b"), pieces: [piece(1, 12)], layout: layout(90) }));
    expect(fixed).toMatchObject({ mapStale: false, pieces: [piece(1, 12)], layout: { slab: { width: 90 } } });
  });

  it("a first build that is refused is not stale: there is nothing older to show", () => {
    const p = mergePreview(null, built(1, { slab: null, pieces: [piece(1, 5)], findings: [overlap] }));
    expect(p).toMatchObject({ slab: null, stale: false, mapStale: false, viewPieces: [piece(1, 5)], layout: null });
  });

  it("a build whose pieces do not fit the bed brings what was tried; the next that fits drops it", () => {
    const tried = {
      bed: { width: 60, depth: 60 },
      room: { minX: 5, minY: 5, maxX: 55, maxY: 55 },
      bands: { bottom: null, top: null, overflows: false },
      pieces: [],
    };
    const none = mergePreview(null, built(1, { tried, findings: [{ severity: "error", code: "does_not_fit", message: "…" }] }));
    expect(none).toMatchObject({ slab: null, layout: null, tried: { bed: { width: 60 } } });
    const fits = mergePreview(none, built(2, { slab: slab("a"), pieces: [piece(1, 10)], layout: layout(100) }));
    expect(fits.tried).toBeNull();
  });
});
