import { describe, expect, it } from "vitest";
import { plateName, titleFromParts } from "./name";

describe("plateName", () => {
  it("puts the order reference before the kit or title", () => {
    expect(plateName({ reference: "ORD-1042", title: "Harbour Run token set" })).toBe("ORD-1042 · Harbour Run token set");
    expect(plateName({ reference: null, title: "gear, cube" })).toBe("gear, cube");
    expect(plateName({ reference: "A1", title: "old title", kitName: "Harbour Run token set" })).toBe("A1 · Harbour Run token set");
    expect(plateName({})).toBe("Plate");
  });
});

describe("titleFromParts", () => {
  it("names the parts without their extensions, once each", () => {
    expect(titleFromParts(["gear.stl", "cube.STL", "gear.stl"])).toBe("gear, cube");
  });
  it("shows three names and counts the rest", () => {
    expect(titleFromParts(["a.stl", "b.3mf", "c.obj", "d.stl", "e.stl"])).toBe("a, b, c and 2 more");
  });
  it("falls back to a plain word when no file had a name", () => {
    expect(titleFromParts(["", ".stl"])).toBe("Plate");
  });
});
