import { beforeAll, describe, expect, it } from "vitest";
import { engine } from "@/tests/support/engine";
import { box } from "@/tests/support/meshes";
import { buildPlate, type PlatePart } from "./build-plate";
import type { FontBook } from "./fonts";
import type { Kernel } from "./kernel";
import { orientMesh } from "./orient";

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

const part = (id: string, name: string, sx: number, sy: number, sz: number, rotateZ = 0): PlatePart => ({
  id,
  name,
  mesh: orientMesh(box(sx, sy, sz), { rotateZ }),
  quantity: 1,
});
const smallPart = (parts: PlatePart[]) =>
  buildPlate(kernel, { parts, options: { marks: { numbers: false, outlines: "none" } }, fonts }).findings.find(
    (f) => f.code === "small_part",
  );

describe("the plate's small_part finding (16 CFR 1501.4: in any orientation)", () => {
  it("names the bar turned 45° and the long rods, which the box-side rule missed, and not the 20 × 20 × 60 block", () => {
    // The bar's box as laid (35.4 × 35.4 × 5) and the rods' 60 / 58 mm exceed what the old rule allowed;
    // each fits the cylinder (small-parts.test.ts has the geometry). The block is 66.3 mm corner to
    // corner, longer than the 65.4 mm longest segment inside.
    const f = smallPart([
      part("bar", "Bar", 45, 5, 5, 45),
      part("rod", "Rod", 60, 3, 3),
      part("rod4", "Thick rod", 58, 4, 4),
      part("block", "Block", 20, 20, 60),
    ]);
    expect(f?.message).toMatch(
      /^Bar \(5\.0 × 35\.4 × 35\.4 mm\), Rod \(3\.0 × 3\.0 × 60\.0 mm\), Thick rod \(4\.0 × 4\.0 × 58\.0 mm\) fit the small-parts cylinder of US 16 CFR 1501 /,
    );
    expect(f?.message).not.toContain("Block");
    // The cylinder is 16 CFR 1501; the ages 3–6 warning label is 16 CFR 1500.19; local rules differ.
    expect(f?.message).toContain("choking-hazard warning label of 16 CFR 1500.19");
    expect(f?.message).toContain("follow the local regulations");
    expect(f?.pieces).toHaveLength(3);
  });

  it("leaves a 33 mm cube alone: too wide every way", () => {
    expect(smallPart([part("cube", "Cube", 33, 33, 33)])).toBeUndefined();
  });
});
