import jsQR from "jsqr";
import { BinaryBitmap, DecodeHintType, HybridBinarizer, QRCodeReader, RGBLuminanceSource } from "@zxing/library";
import { beforeAll, describe, expect, it } from "vitest";
import { engine, zlibDeflate } from "@/tests/support/engine";
import { box } from "@/tests/support/meshes";
import { rasterizeStl, toRgba } from "@/tests/support/raster";
import { buildPlate, type BuildInput, type PlatePart } from "./build-plate";
import { hexTile, loft, pawn } from "./demo-shapes";
import type { FontBook } from "./fonts";
import { importMesh } from "./import";
import type { Kernel } from "./kernel";
import { openOrMisorientedEdges, signedVolume, bounds as meshBounds } from "./mesh";
import { DEFAULT_OPTIONS, type SlabOptionsInput } from "./options";
import { orientMesh } from "./orient";
import { CORNER_SEGMENTS, DISC_SEGMENTS } from "./slab";

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

const tile = (): PlatePart => ({ id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 4 });
const pawnPart = (): PlatePart => ({ id: "pawn", name: "Beacon pawn", mesh: orientMesh(pawn()), quantity: 2 });
const plate = (options: SlabOptionsInput, parts: PlatePart[] = [tile(), pawnPart()], extra: Partial<BuildInput> = {}) =>
  buildPlate(kernel, { parts, options, fonts, ...extra });
const codes = (r: ReturnType<typeof plate>) => r.findings.map((f) => f.code);
const plain: SlabOptionsInput = { marks: { numbers: false, outlines: "none" } };

describe("defaults are the trade's common practice", () => {
  it("thickness 1.0 mm, gap 0.2 mm (in the 0.2–0.3 range, one 0.2 mm layer), rounded corners, 0.4 mm nozzle", () => {
    // Common practice: a 1.0 mm slab, a 0.2–0.3 mm gap; the gap is one whole default layer, so a slicer keeps it.
    expect(DEFAULT_OPTIONS.slab).toMatchObject({ thickness: 1.0, gap: 0.2, shape: "rounded-rect" });
    expect(DEFAULT_OPTIONS.slab.gap / DEFAULT_OPTIONS.layerHeight).toBe(1);
    expect(DEFAULT_OPTIONS.slab.cornerRadius).toBeGreaterThan(4); // > 4 mm against warping (Hydra Research design rules)
    expect(DEFAULT_OPTIONS.nozzle).toBe(0.4);
  });

  it("the measured gap between the slab top and every part bottom equals the option", () => {
    for (const gap of [0.25, 0.2, 0.3]) {
      const r = plate({ slab: { gap } });
      const [slab, ...pieces] = r.bodies!;
      const slabTop = meshBounds(slab!.mesh).max[2];
      expect(slabTop).toBeCloseTo(1.0, 5);
      expect(pieces).toHaveLength(6);
      for (const p of pieces) expect(meshBounds(p.mesh).min[2] - slabTop).toBeCloseTo(gap, 5);
    }
  });

  it("the defaults pass their own checks: no errors or warnings with text, QR, numbers and rings", () => {
    const r = plate({ marks: { text: [{ value: "ORDER 10482" }], qr: { value: "https://example.com/o/10482" } } });
    expect(r.findings.filter((f) => f.severity !== "info")).toEqual([]);
  });
});

describe("areas and volumes against handbook formulas", () => {
  it("a rounded-rectangle slab: (w·h − (4 − π)·r²)·t, within the corner sampling's known shortfall", () => {
    const r = plate({ ...plain, slab: { cornerRadius: 6, thickness: 1.2 } }, [{ ...tile(), quantity: 1 }], { formats: [] });
    const { width: w, depth: h } = r.layout!.slab;
    const rr = 6;
    const formula = (w * h - (4 - Math.PI) * rr * rr) * 1.2;
    // Each quarter circle is N chords: it falls short of the arc by (r²/2)(π/2 − N·sin(π/2N)).
    const N = CORNER_SEGMENTS;
    const shortfall = 4 * ((rr * rr) / 2) * (Math.PI / 2 - N * Math.sin(Math.PI / (2 * N))) * 1.2;
    expect(Math.abs(r.estimates!.slabVolume - (formula - shortfall))).toBeLessThan(1e-3 * formula * 1e-3 + 1e-3);
    expect(Math.abs(r.estimates!.slabVolume - formula)).toBeLessThanOrEqual(shortfall + 1e-3);
  });

  it("a disc slab: π·r²·t, within the polygon's known shortfall", () => {
    const r = plate({ ...plain, slab: { shape: "disc" } }, [{ ...pawnPart(), quantity: 3 }]);
    const radius = r.layout!.slab.width / 2; // a vertex sits on the x axis at each end
    const n = DISC_SEGMENTS;
    const polygon = (n / 2) * radius * radius * Math.sin((2 * Math.PI) / n);
    expect(r.estimates!.slabVolume).toBeCloseTo(polygon * 1.0, 3);
    expect(Math.abs(r.estimates!.slabVolume - Math.PI * radius * radius) / (Math.PI * radius * radius)).toBeLessThan(
      (2 * Math.PI ** 2) / (3 * n * n) + 1e-9,
    );
  });

  it("placed pieces keep their volume, and every body is closed", () => {
    const r = plate({ marks: { text: [{ value: "Kit 7" }] } }, undefined, { formats: ["stl"] });
    const tileV = signedVolume(tile().mesh),
      pawnV = signedVolume(pawnPart().mesh);
    const [, ...pieces] = r.bodies!;
    const vols = pieces.map((p) => signedVolume(p.mesh)).sort((a, b) => a - b);
    expect(vols.slice(0, 2).every((v) => Math.abs(v - pawnV) < 1e-6 * pawnV)).toBe(true);
    expect(vols.slice(2).every((v) => Math.abs(v - tileV) < 1e-6 * tileV)).toBe(true);
    for (const b of r.bodies!) expect(openOrMisorientedEdges(b.mesh)).toBe(0);
    // The written STL reads back as the same seven closed bodies.
    const back = importMesh(r.stl!, kernel, { fileName: "plate.stl" });
    expect(back.bodies).toHaveLength(7);
  });

  it("engraving removes exactly what the cutters cover", () => {
    const bare = plate(plain, [{ ...tile(), quantity: 1 }]);
    const ringed = plate({ marks: { numbers: false, outlines: "ring" } }, [{ ...tile(), quantity: 1 }]);
    // Same slab size? Rings add their width around the piece, so compare per area instead.
    const bareArea = bare.estimates!.slabVolume / 1.0;
    expect(bareArea).toBeGreaterThan(0);
    const ringArea = (ringed.layout!.slab.width * ringed.layout!.slab.depth - (4 - Math.PI) * 25) * 1.0 - ringed.estimates!.slabVolume;
    // A ring 0.8 mm wide, 0.8 mm outside a hexagon of perimeter 6·s, engraved 0.4 mm: ≈ perimeter ×
    // width × depth, the perimeter taken along the ring's middle (the hexagon's plus 2π × 1.2 mm).
    const s = 30 / Math.sqrt(3);
    const approx = (6 * s + 2 * Math.PI * (0.8 + 0.4)) * 0.8 * 0.4;
    expect(ringArea).toBeGreaterThan(approx * 0.95);
    expect(ringArea).toBeLessThan(approx * 1.05);
  });
});

describe("outlines", () => {
  const inside = (x: number, y: number, poly: [number, number][]) => {
    let c = false;
    for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
      const [xi, yi] = poly[i]!,
        [xj, yj] = poly[j]!;
      if (yi > y !== yj > y && x < ((xj - xi) * (y - yi)) / (yj - yi) + xi) c = !c;
    }
    return c;
  };
  /** Slab-top heights under each piece's footprint, from the STL alone. */
  function heightsUnderPieces(r: ReturnType<typeof plate>) {
    const slabOnly = new Uint8Array(84 + 50 * (r.bodies![0]!.mesh.triVerts.length / 3));
    slabOnly.set(r.stl!.subarray(0, slabOnly.length));
    new DataView(slabOnly.buffer).setUint32(80, r.bodies![0]!.mesh.triVerts.length / 3, true);
    const map = rasterizeStl(slabOnly, 8, { minX: 0, minY: 0, maxX: r.layout!.slab.width, maxY: r.layout!.slab.depth });
    const zs: number[] = [];
    for (const p of r.pieces) {
      for (let py = 0; py < map.height; py++) {
        const y = map.originY + (map.height - 1 - py + 0.5) / map.pxPerMm;
        for (let px = 0; px < map.width; px++) {
          const x = map.originX + (px + 0.5) / map.pxPerMm;
          if (p.outline.some((c) => inside(x, y, c))) zs.push(map.z[py * map.width + px]!);
        }
      }
    }
    return zs;
  }

  it("rings and numbers never reach under a piece: the slab top is whole beneath every footprint", () => {
    const r = plate({ marks: { outlines: "ring", numbers: true } }, undefined, { formats: ["stl"] });
    const zs = heightsUnderPieces(r);
    expect(zs.length).toBeGreaterThan(1000);
    expect(zs.reduce((a, b) => Math.min(a, b), Infinity)).toBeCloseTo(1.0, 5);
  });

  it("pockets lower each piece and keep the air gap above the pocket floor", () => {
    const r = plate({ marks: { outlines: "pocket" } }, undefined, { formats: ["stl"] });
    const zs = heightsUnderPieces(r);
    expect(zs.reduce((a, b) => Math.max(a, b), -Infinity)).toBeCloseTo(1.0 - 0.4, 5); // the pocket floor, 0.4 mm down
    for (const p of r.bodies!.slice(1)) expect(meshBounds(p.mesh).min[2] - (1.0 - 0.4)).toBeCloseTo(DEFAULT_OPTIONS.slab.gap, 5);
  });
});

describe("layout", () => {
  /** Least distance between two polygons' outlines (independent of the kernel): point-to-segment. */
  function distance(a: [number, number][][], b: [number, number][][]): number {
    const seg = (p: [number, number], q: [number, number], r: [number, number]) => {
      const dx = r[0] - q[0],
        dy = r[1] - q[1];
      const t = Math.max(0, Math.min(1, ((p[0] - q[0]) * dx + (p[1] - q[1]) * dy) / (dx * dx + dy * dy || 1)));
      return Math.hypot(p[0] - q[0] - t * dx, p[1] - q[1] - t * dy);
    };
    let best = Infinity;
    for (const [x, y] of [
      [a, b],
      [b, a],
    ] as const)
      for (const ca of x)
        for (const p of ca)
          for (const cb of y) for (let i = 0; i < cb.length; i++) best = Math.min(best, seg(p, cb[i]!, cb[(i + 1) % cb.length]!));
    return best;
  }
  const inside = (p: [number, number], poly: [number, number][]) => {
    let c = false;
    for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) {
      const [xi, yi] = poly[i]!,
        [xj, yj] = poly[j]!;
      if (yi > p[1] !== yj > p[1] && p[0] < ((xj - xi) * (p[1] - yi)) / (yj - yi) + xi) c = !c;
    }
    return c;
  };

  it.each(["rounded-rect", "disc", "contour"] as const)(
    "%s: no two shadow footprints closer than the spacing; every piece inside the slab minus the margin",
    (shape) => {
      const r = plate({ slab: { shape }, layout: { spacing: 3 }, marks: { text: [{ value: "ORDER 10482" }] } });
      expect(codes(r).filter((c) => c !== "small_part")).toEqual([]);
      const ps = r.pieces;
      for (let i = 0; i < ps.length; i++)
        for (let j = i + 1; j < ps.length; j++) expect(distance(ps[i]!.outline, ps[j]!.outline)).toBeGreaterThanOrEqual(3 - 1e-3);
      const slab = r.layout!.slab.outline;
      for (const p of ps) {
        for (const c of p.outline) {
          for (const pt of c) {
            expect(slab.some((s) => inside(pt, s))).toBe(true);
            expect(distance([[pt]], slab)).toBeGreaterThanOrEqual(4 - 1e-3);
          }
        }
      }
      expect(r.layout!.utilisation).toBeGreaterThan(0.1);
      expect(r.layout!.utilisation).toBeLessThan(1);
    },
  );

  it("is deterministic", () => {
    const a = plate({ marks: { text: [{ value: "A" }] } });
    const b = plate({ marks: { text: [{ value: "A" }] } });
    expect(b.pieces).toEqual(a.pieces);
  });

  it("numbers pieces row by row from the top left", () => {
    const r = plate({}, [{ ...tile(), quantity: 6 }]);
    const ps = r.pieces;
    for (let i = 1; i < ps.length; i++) {
      const prev = ps[i - 1]!,
        cur = ps[i]!;
      const sameRow = Math.abs(prev.bounds.maxY - cur.bounds.maxY) < 5;
      if (sameRow) expect(cur.bounds.minX).toBeGreaterThan(prev.bounds.minX);
      else expect(cur.bounds.maxY).toBeLessThan(prev.bounds.maxY);
    }
  });

  it("turns an elongated diagonal part to pack it", () => {
    const bar = orientMesh(box(60, 6, 4), { rotateZ: 30 });
    const r = plate(plain, [{ id: "bar", name: "Bar", mesh: bar, quantity: 2 }]);
    expect(
      r.pieces.every(
        (p) => Math.abs((((p.rotation % 90) + 90) % 90) - 60) < 0.5 || Math.abs((((p.rotation % 90) + 90) % 90) - (150 % 90)) < 0.5,
      ),
    ).toBe(true);
  });

  it("honours hand placements and checks them instead", () => {
    const auto = plate(plain, [{ ...tile(), quantity: 2 }]);
    const placements = auto.pieces.map((p) => ({ piece: p.slot, x: p.x, y: p.y, rotation: p.rotation }));
    const same = plate({ ...plain, layout: { placements } }, [{ ...tile(), quantity: 2 }]);
    expect(same.findings.filter((f) => f.severity === "error")).toEqual([]);
    // Put piece 2 on top of piece 1: overlap is an error, and no file is made.
    const clash = plate(
      { ...plain, layout: { placements: [placements[0]!, { ...placements[1]!, x: placements[0]!.x + 5, y: placements[0]!.y }] } },
      [{ ...tile(), quantity: 2 }],
      { formats: ["stl"] },
    );
    expect(codes(clash)).toContain("pieces_overlap");
    expect(clash.stl).toBeUndefined();
  });

  it("says when the kit cannot fit the bed", () => {
    const r = plate({ layout: { bed: { width: 60, depth: 60 } } }, undefined, { formats: ["stl"] });
    expect(r.findings[0]).toMatchObject({ severity: "error", code: "does_not_fit" });
    expect(r.stl).toBeUndefined();
    // What was tried comes back for the plate map: every piece, each inside the bed or marked as reaching past it.
    const tried = r.tried!;
    expect(tried.bed).toEqual({ width: 60, depth: 60 });
    expect(tried.pieces.map((p) => p.slot)).toEqual([1, 2, 3, 4, 5, 6]);
    const { room } = tried;
    const within = (b: { minX: number; minY: number; maxX: number; maxY: number }) =>
      b.minX >= room.minX - 1e-6 && b.maxX <= room.maxX + 1e-6 && b.minY >= room.minY - 1e-6 && b.maxY <= room.maxY + 1e-6;
    // The packer runs past the bed's depth, not its width: what does not fit sits above the room.
    expect(tried.pieces.some((p) => p.overflows)).toBe(true);
    expect(Math.max(...tried.pieces.map((p) => p.bounds.maxY))).toBeGreaterThan(tried.room.maxY);
    expect(Math.max(...tried.pieces.map((p) => p.bounds.maxX))).toBeLessThanOrEqual(tried.room.maxX + 1e-6);
    for (const p of tried.pieces) {
      expect(p.outline.length).toBeGreaterThanOrEqual(3);
      if (!p.overflows) expect(within(p.bounds)).toBe(true);
    }
    // The packed pieces do not overlap: their shadows' extents are apart.
    const boxes = tried.pieces.map((p) => p.bounds);
    for (let i = 0; i < boxes.length; i++)
      for (let j = i + 1; j < boxes.length; j++) {
        const a = boxes[i]!,
          b = boxes[j]!;
        expect(a.maxX <= b.minX + 1e-6 || b.maxX <= a.minX + 1e-6 || a.maxY <= b.minY + 1e-6 || b.maxY <= a.minY + 1e-6).toBe(true);
      }
    expect(plate({}).tried).toBeUndefined();
    // A line too long for the bed is the line's own finding, never the kit's.
    const long = plate({
      layout: { bed: { width: 100, depth: 200 } },
      marks: { text: [{ value: "THIS LINE IS FAR TOO LONG FOR THE BED", fit: "refuse" }] },
    });
    expect(codes(long)).toContain("text_too_long");
    expect(codes(long)).not.toContain("does_not_fit");
    expect(long.findings.find((f) => f.code === "text_too_long")!.message).toMatch(/^Text line 1 .* mm too long/);
  });
});

describe("QR code on the slab", () => {
  const decodeBoth = (rgba: Uint8ClampedArray, w: number, h: number) => {
    const a = jsQR(rgba, w, h)?.data ?? null;
    let b: string | null;
    try {
      const lum = new Uint8ClampedArray(w * h);
      for (let i = 0; i < w * h; i++) lum[i] = rgba[i * 4]!;
      const src = new RGBLuminanceSource(lum, w, h);
      const hints = new Map([[DecodeHintType.TRY_HARDER, true]]);
      b = new QRCodeReader().decode(new BinaryBitmap(new HybridBinarizer(src)), hints).getText();
    } catch {
      b = null;
    }
    return [a, b];
  };

  it.each([
    // byte-mode values (lower case and punctuation), so the capacity table applies as it is
    ["https://example.com/thanks", "M", 2], // 26 bytes: over v1-M's 14, exactly v2-M's 26
    ["hello", "H", 1],
    ["order for sam quill at marrowby tabletop", "L", 3], // 40 bytes: over v2-L's 32, within v3-L's 53
  ] as const)("rasterised from the exported STL, %s decodes with jsQR and ZXing, also after print spread", (value, level, minVersion) => {
    const r = plate({ ...plain, marks: { ...plain.marks, qr: { value, level, module: 1.2 } } }, [{ ...pawnPart(), quantity: 1 }], {
      formats: ["stl"],
    });
    const qr = r.layout!.marks.find((m) => m.kind === "qr")!;
    const map = rasterizeStl(r.stl!, 10, qr.bounds); // 10 px/mm over the code and its quiet zone
    const thickness = 1.0;
    const engraved = (z: number) => z < thickness - 0.1;
    expect(decodeBoth(toRgba(map, engraved), map.width, map.height)).toEqual([value, value]);
    // Print spread: the slab's plastic swells half a nozzle width (0.2 mm = 2 px) into each engraved module.
    const eroded = erode(map, engraved, 2);
    expect(decodeBoth(eroded, map.width, map.height)).toEqual([value, value]);
    // Modules a side: 17 + 4·version (ISO/IEC 18004), the version the byte-mode capacity table predicts.
    const side = countModules(map, engraved, 1.2);
    const version = (side - 17) / 4;
    expect(Number.isInteger(version)).toBe(true);
    expect(version).toBe(predictVersion(new TextEncoder().encode(value).length, level));
    expect(version).toBeGreaterThanOrEqual(minVersion);
  });

  /** Byte-mode capacity in bytes for versions 1–6 at L/M/Q/H (ISO/IEC 18004 table 7, via the trade facts). */
  function predictVersion(bytes: number, level: "L" | "M" | "Q" | "H"): number {
    const table = { L: [17, 32, 53, 78, 106, 134], M: [14, 26, 42, 62, 84, 106], Q: [11, 20, 32, 46, 60, 74], H: [7, 14, 24, 34, 44, 58] };
    return table[level].findIndex((cap) => bytes <= cap) + 1;
  }

  function erode(map: ReturnType<typeof rasterizeStl>, dark: (z: number) => boolean, px: number): Uint8ClampedArray {
    const { width: w, height: h } = map;
    const out = new Uint8ClampedArray(w * h * 4);
    for (let y = 0; y < h; y++)
      for (let x = 0; x < w; x++) {
        let d = dark(map.z[y * w + x]!);
        for (let dy = -px; d && dy <= px; dy++)
          for (let dx = -px; d && dx <= px; dx++) {
            const X = x + dx,
              Y = y + dy;
            if (dx * dx + dy * dy > px * px) continue;
            if (X < 0 || Y < 0 || X >= w || Y >= h || !dark(map.z[Y * w + X]!)) d = false;
          }
        const v = d ? 0 : 255;
        out.set([v, v, v, 255], (y * w + x) * 4);
      }
    return out;
  }

  /** Width of the symbol (first to last dark column through the finder patterns) in modules. */
  function countModules(map: ReturnType<typeof rasterizeStl>, dark: (z: number) => boolean, moduleMm: number): number {
    let minX = Infinity,
      maxX = -Infinity;
    for (let y = 0; y < map.height; y++)
      for (let x = 0; x < map.width; x++)
        if (dark(map.z[y * map.width + x]!)) {
          minX = Math.min(minX, x);
          maxX = Math.max(maxX, x);
        }
    return Math.round((maxX - minX + 1) / map.pxPerMm / moduleMm);
  }
});

describe("one fixture per finding code", () => {
  const warp = (material: "PLA" | "ABS", cornerRadius: number) => plate({ material, slab: { cornerRadius } }, [{ ...tile(), quantity: 1 }]);
  it.each([
    ["sharp_corners", () => warp("ABS", 2), () => warp("ABS", 5), () => warp("PLA", 2)],
    ["gap_out_of_range", () => plate({ slab: { gap: 0.15 } }), () => plate({ slab: { gap: 0.3 } })],
    ["gap_below_layer", () => plate({ slab: { gap: 0.15 }, layerHeight: 0.2 }), () => plate({ slab: { gap: 0.2 }, layerHeight: 0.2 })],
    // Slicers cut each layer at its middle height (from memory): with a 0.25 mm first layer and 0.2 mm
    // layers the slab's last layer ends at 1.05 mm and a piece based at 1.1 mm starts in that same layer.
    [
      "gap_sliced_away",
      () => plate({ slab: { gap: 0.1 }, firstLayerHeight: 0.25 }),
      () => plate({ slab: { gap: 0.2 }, firstLayerHeight: 0.25 }),
    ],
    ["thickness_sliced", () => plate({ slab: { thickness: 1.1 } }), () => plate({ slab: { thickness: 1.2 } })],
    ["gap_sliced", () => plate({ slab: { gap: 0.25 } }), () => plate({ slab: { gap: 0.2 } })],
    [
      "mark_too_deep",
      () => plate({ slab: { thickness: 0.6 }, marks: { text: [{ value: "DEEP", depth: 0.8 }] } }),
      () => plate({ slab: { thickness: 1.2 }, marks: { text: [{ value: "DEEP", depth: 0.8 }] } }),
    ],
    [
      "slab_too_thin_to_engrave",
      () => plate({ slab: { thickness: 0.6 }, layerHeight: 0.3, firstLayerHeight: 0.3 }),
      () => plate({ slab: { thickness: 0.6 }, layerHeight: 0.3, firstLayerHeight: 0.3, marks: { numbers: false, outlines: "none" } }),
    ],
    [
      "emboss_needs_height",
      () => plate({ marks: { text: [{ value: "UP", relief: "emboss", depth: "max" }] } }),
      () => plate({ marks: { text: [{ value: "UP", relief: "engrave", depth: "max" }] } }),
    ],
    [
      "ring_too_narrow",
      () => plate({ nozzle: 0.8, marks: { ringStyle: { width: 0.6 } } }),
      () => plate({ nozzle: 0.8, marks: { ringStyle: { width: 0.8 } } }),
      () => plate({ nozzle: 0.8, marks: { outlines: "pocket", ringStyle: { width: 0.6 } } }),
    ],
    ["corners_grow_slab", () => cubes(30, { slab: { cornerRadius: 20 } }), () => cubes(30, { slab: { cornerRadius: 4 } })],
    [
      "corner_radius_limited",
      () => cubes(30, { slab: { cornerRadius: 40, margin: 2 }, layout: { bed: { width: 100, depth: 100 } } }),
      () => cubes(30, { slab: { cornerRadius: 40, margin: 2 } }),
    ],
    [
      "piece_numbers_mismatch",
      () => plate({ layout: { pieceNumbers: [1, 2, 3] } }),
      () => plate({ layout: { pieceNumbers: [7, 8, 9, 10, 11, 12] } }),
    ],
    [
      "qr_module_too_small",
      () => plate({ marks: { qr: { value: "x", module: 0.8 } } }),
      () => plate({ marks: { qr: { value: "x", module: 1.0 } } }),
    ],
    [
      "stroke_too_thin",
      () => plate({ marks: { text: [{ value: "Tiny", size: 1.5 }] } }),
      () => plate({ marks: { text: [{ value: "Tiny", size: 5 }] } }),
    ],
    [
      "tip_over_risk",
      () => plate({}, [{ id: "pin", name: "Pin", mesh: orientMesh(box(4, 4, 20)), quantity: 1 }]),
      () => plate({}, [{ id: "pin", name: "Pin", mesh: orientMesh(box(8, 8, 20)), quantity: 1 }]),
    ],
    [
      "contact_too_small",
      () => plate({}, [{ id: "cone", name: "Cone", mesh: cone(0.3), quantity: 1 }]),
      () => plate({}, [{ id: "cone", name: "Cone", mesh: cone(3), quantity: 1 }]),
    ],
    [
      "small_part",
      () => plate({}, [pawnPart()]),
      () => plate({}, [{ id: "big", name: "Board", mesh: orientMesh(box(80, 60, 3)), quantity: 1 }]),
    ],
    [
      "does_not_fit",
      () => plate({ layout: { bed: { width: 50, depth: 50 } } }),
      () => plate({ layout: { bed: { width: 220, depth: 220 } } }),
    ],
    [
      "unfilled_placeholder",
      () => plate({ marks: { text: [{ value: "Order {order}" }] } }),
      () => plate({ marks: { text: [{ value: "Order {order}" }] } }, undefined, { variables: { order: "7" } }),
    ],
    [
      "text_shrunk",
      () => plate({ marks: { text: [{ value: "Thank you, Jordan Okafor!", size: 4, maxWidth: 70 }] } }),
      () => plate({ marks: { text: [{ value: "Thank you, Sam!", size: 4, maxWidth: 70 }] } }),
    ],
    [
      "text_too_long",
      () => plate({ marks: { text: [{ value: "Thank you, Jordan Okafor!", size: 4, maxWidth: 70, fit: "refuse" }] } }),
      () => plate({ marks: { text: [{ value: "Thank you, Jordan Okafor!", size: 4, maxWidth: 70 }] } }),
    ],
    ["mark_collides", () => placedText(true), () => placedText(false)],
    ["pieces_overlap", () => twoAt(5), () => twoAt(45)],
    ["pieces_too_close", () => twoAt(32), () => twoAt(45)],
    ["pieces_fuse", () => twoAt(30.2), () => twoAt(32)],
    ["piece_outside_bed", () => offBed(true), () => offBed(false)],
    ["slab_outside_bed", () => offBed(true), () => offBed(false)],
  ] as [string, ...(() => ReturnType<typeof plate>)[]][])(
    "%s: triggered by its fixture and not by the near miss",
    (code, trigger, ...misses) => {
      expect(codes(trigger())).toContain(code);
      for (const miss of misses) expect(codes(miss())).not.toContain(code);
    },
  );

  /** n small cubes (6 mm), as an order of game counters might be. */
  function cubes(n: number, options: SlabOptionsInput) {
    return plate(options, [{ id: "cube", name: "Counter", mesh: orientMesh(box(6, 6, 6)), quantity: n }]);
  }
  /** Text placed by hand onto the piece, or left to the automatic band. */
  function placedText(onPiece: boolean) {
    const base = plate({}, [{ ...tile(), quantity: 1 }]);
    const p = base.pieces[0]!;
    const position = onPiece ? { x: p.x - 5, y: p.y - 2 } : ("auto" as const);
    const placements = [{ piece: p.slot, x: p.x, y: p.y, rotation: p.rotation }];
    return plate({ layout: { placements }, marks: { text: [{ value: "HELLO", position }] } }, [{ ...tile(), quantity: 1 }]);
  }
  /** Two 30 mm squares placed by hand, their centres dx apart. */
  function twoAt(dx: number) {
    const sq = { id: "sq", name: "Square", mesh: orientMesh(box(30, 30, 4)), quantity: 2 };
    return plate(
      {
        ...plain,
        layout: {
          placements: [
            { piece: 1, x: 30, y: 30, rotation: 0 },
            { piece: 2, x: 30 + dx, y: 30, rotation: 0 },
          ],
        },
      },
      [sq],
    );
  }
  function offBed(out: boolean) {
    const sq = { id: "sq", name: "Square", mesh: orientMesh(box(20, 20, 4)), quantity: 2 };
    return plate(
      {
        ...plain,
        layout: {
          placements: [
            { piece: 1, x: 30, y: 30, rotation: 0 },
            { piece: 2, x: out ? 240 : 60, y: 30, rotation: 0 },
          ],
        },
      },
      [sq],
    );
  }
  /** A cone standing on its tip (radius `tip` mm at the base, 5 mm at 10 mm up). */
  function cone(tip: number) {
    const ring = (z: number, r: number) => ({
      z,
      points: [...Array(24).keys()].map((i) => [r * Math.cos((i * Math.PI) / 12), r * Math.sin((i * Math.PI) / 12)] as [number, number]),
    });
    return orientMesh(loft([ring(0, tip), ring(10, 5)]));
  }
});

describe("placeholders", () => {
  it("fills {date} with today's date unless given, and the caller's values otherwise", () => {
    const r = plate({ marks: { text: [{ value: "{date}" }, { value: "{order} for {customer}" }] } }, undefined, {
      variables: { order: "10482", customer: "Sam" },
    });
    expect(r.layout!.marks.map((m) => m.value)).toEqual([new Date().toISOString().slice(0, 10), "10482 for Sam"]);
    const fixed = plate({ marks: { text: [{ value: "{date}" }] } }, undefined, { variables: { date: "1 Dec" } });
    expect(fixed.layout!.marks[0]!.value).toBe("1 Dec");
  });
});

describe("files and memory", () => {
  it("writes STL and 3MF, checked as closed, and frees every kernel object", () => {
    const before = kernel.live();
    const r = plate({ marks: { text: [{ value: "ORDER {order}" }], qr: { value: "{order}" } } }, undefined, {
      formats: ["stl", "3mf"],
      variables: { order: "10482" },
      deflateRaw: zlibDeflate,
    });
    expect(r.stl!.byteLength).toBe(84 + 50 * r.stats.triangles);
    const back = importMesh(r.threeMf!, kernel, { fileName: "p.3mf" });
    expect(back.bodies.map((b) => b.name)[0]).toBe("Slab");
    expect(back.bodies).toHaveLength(7);
    expect(kernel.live()).toBe(before);
  });

  it("frees every kernel object when the build stops on an error", () => {
    const before = kernel.live();
    plate({ layout: { bed: { width: 50, depth: 50 } } });
    expect(kernel.live()).toBe(before);
  });
});
