import { describe, expect, it } from "vitest";
import { DEFAULT_OPTIONS, slabOptionsSchema } from "@/lib/geometry/options";
import { readSlabSettings } from "./kits";

describe("a kit's stored slab settings", () => {
  const options = {
    slab: { shape: "disc", thickness: 1.2, gap: 0.25 },
    layout: { bed: { width: 250, depth: 210 }, placements: [{ piece: 1, x: 20, y: 30, rotation: 15 }] },
    marks: { text: [{ value: "Thanks, {customer}" }], qr: { value: "https://shop.example/o/1" }, numbers: true },
  };

  it("read back as saved: options, values and the template applied", () => {
    const r = readSlabSettings({ options, samples: { customer: "Sam" }, template: { id: "t1", version: 3 } });
    expect(r).toEqual({ options, samples: { customer: "Sam" }, template: { id: "t1", version: 3 } });
    // What is read back is what the engine accepts, hand placements included.
    expect(slabOptionsSchema.parse(r!.options).layout.placements).toEqual([{ piece: 1, x: 20, y: 30, rotation: 15 }]);
  });

  it("values and template may be left out", () => {
    expect(readSlabSettings({ options: {} })).toEqual({ options: {}, samples: {}, template: null });
    expect(slabOptionsSchema.parse(readSlabSettings({ options: {} })!.options).slab.gap).toBe(DEFAULT_OPTIONS.slab.gap);
  });

  it("nothing stored, another shape, or options the engine no longer takes read as none (the defaults), without an error", () => {
    expect(readSlabSettings(null)).toBeNull();
    expect(readSlabSettings(undefined)).toBeNull();
    expect(readSlabSettings("slab")).toBeNull();
    expect(readSlabSettings([options])).toBeNull();
    // An older record: the bare options, not wrapped.
    expect(readSlabSettings(options)).toBeNull();
    expect(readSlabSettings({ options: { slab: { shape: "star" } } })).toBeNull();
    expect(readSlabSettings({ options: { slab: { gap: -1 } } })).toBeNull();
    expect(readSlabSettings({ options: null })).toBeNull();
    expect(readSlabSettings({ options, samples: { customer: 7 } })).toBeNull();
  });
});
