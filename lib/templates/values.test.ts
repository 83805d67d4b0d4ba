import { describe, expect, it } from "vitest";
import { plateValues, resolveTemplateValues, thumbnailValues, TemplateValueError } from "./values";

const defs = [
  { name: "order", default: "", sample: "10482" },
  { name: "customer", default: "friend", sample: "Sam" },
  { name: "shop", default: "Harbour Crafts", sample: "" },
];
const day = { date: "2026-12-02", kit: "Harbour Run" };

describe("a template's values", () => {
  it("a preview takes what is given, else the sample, else the default; {date} and {kit} filled", () => {
    expect(resolveTemplateValues(defs, { customer: "Ana" }, { for: "preview", ...day })).toEqual({
      values: { date: "2026-12-02", kit: "Harbour Run", order: "10482", customer: "Ana", shop: "Harbour Crafts" },
      missing: [],
      unknown: [],
    });
  });

  it("a plate never takes a sample: a variable with neither a value nor a default is missing", () => {
    const r = resolveTemplateValues(defs, {}, { for: "plate", ...day });
    expect(r.values).toEqual({ date: "2026-12-02", kit: "Harbour Run", customer: "friend", shop: "Harbour Crafts" });
    expect(r.missing).toEqual(["order"]);
  });

  it("a blank value counts as not given: the default fills it (a cleared field is not an empty engraving)", () => {
    const r = resolveTemplateValues(defs, { order: "7", shop: "", customer: "  " }, { for: "plate", ...day });
    expect(r.values.shop).toBe("Harbour Crafts");
    expect(r.values.customer).toBe("friend");
    expect(r.missing).toEqual([]);
  });

  it("names the template does not have are reported, not used; a given {date} wins (a remade plate keeps its day)", () => {
    const r = resolveTemplateValues(defs, { order: "1", ordr: "2", date: "2026-11-30" }, { for: "plate", ...day });
    expect(r.unknown).toEqual(["ordr"]);
    expect(r.values).not.toHaveProperty("ordr");
    expect(r.values.date).toBe("2026-11-30");
  });

  it("without a kit, {kit} is left out", () => {
    expect(resolveTemplateValues([], {}, { for: "preview", date: "2026-12-02" }).values).toEqual({ date: "2026-12-02" });
  });

  it("plateValues refuses a missing value and an unknown name, naming them", () => {
    const caught = (f: () => unknown) => {
      try {
        f();
      } catch (e) {
        return e as TemplateValueError;
      }
      throw new Error("expected an error");
    };
    const missing = caught(() => plateValues(defs, { shop: "" }, day));
    expect([missing.code, missing.names]).toEqual(["missing_variable", ["order"]]);
    expect(missing.message).toBe("Give a value for {order}: the template has no default for it.");
    const extra = caught(() => plateValues(defs, { order: "1", ordr: "2" }, day));
    expect([extra.code, extra.names]).toEqual(["unknown_variable", ["ordr"]]);
    expect(plateValues(defs, { order: "20931" }, day)).toEqual({
      date: "2026-12-02",
      kit: "Harbour Run",
      order: "20931",
      customer: "friend",
      shop: "Harbour Crafts",
    });
  });

  it("a thumbnail shows samples, else defaults, else the variable's own name", () => {
    expect(thumbnailValues([...defs, { name: "note", default: "", sample: "" }], "2026-12-02")).toEqual({
      date: "2026-12-02",
      kit: "Sample kit",
      order: "10482",
      customer: "Sam",
      shop: "Harbour Crafts",
      note: "note",
    });
  });
});
