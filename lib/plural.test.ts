import { describe, expect, it } from "vitest";
import { plural } from "./plural";

// CLDR plural rules for English (unicode.org/cldr/charts, "Language Plural Rules"): the category "one"
// is i = 1 and v = 0, i.e. the integer 1 only; 0, 2, 1.5 and every other number are "other".
describe("plural", () => {
  it("uses the singular for exactly one", () => {
    expect(plural(1, "piece")).toBe("1 piece");
  });
  it("uses the plural for zero, many and fractions", () => {
    expect(plural(0, "piece")).toBe("0 pieces");
    expect(plural(2, "piece")).toBe("2 pieces");
    expect(plural(1.5, "page")).toBe("1.5 pages");
  });
  it("takes an irregular plural and groups thousands", () => {
    expect(plural(3, "copy", "copies")).toBe("3 copies");
    expect(plural(1213, "plate")).toBe("1,213 plates");
  });
});
