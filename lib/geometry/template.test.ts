import { describe, expect, it } from "vitest";
import { describeChanges, mergeOptions, templateBodySchema, usedPlaceholders } from "./template";

const defs = [
  { name: "order", default: "", sample: "10482" },
  { name: "customer", default: "friend", sample: "Sam" },
];

describe("template variables", () => {
  it("a template that uses an undefined variable cannot be saved; built-ins need no definition", () => {
    const bad = templateBodySchema.safeParse({ options: { marks: { text: [{ value: "Thanks {customr} · {date}" }] } }, variables: defs });
    expect(bad.success).toBe(false);
    expect(bad.error!.issues[0]!.message).toMatch(/uses \{customr\}, which is not defined/);
    const ok = templateBodySchema.safeParse({
      options: { marks: { text: [{ value: "ORDER {order} · {kit} · {date}" }], qr: { value: "https://shop.example/o/{order}" } } },
      variables: defs,
    });
    expect(ok.success).toBe(true);
    expect(usedPlaceholders(ok.data!.options)).toEqual(["order", "kit", "date"]);
  });

  it("names: defined twice, or taking a built-in's name, is refused", () => {
    const r = templateBodySchema.safeParse({ options: {}, variables: [...defs, { name: "order" }, { name: "date" }] });
    expect(r.error!.issues.map((i) => i.message)).toEqual([
      expect.stringMatching(/defined twice/),
      expect.stringMatching(/filled by Slabwright itself/),
    ]);
    expect(templateBodySchema.safeParse({ options: {}, variables: [{ name: "Order No" }] }).success).toBe(false);
  });

  it("options over a template's merge key by key; text lines replace as a whole", () => {
    const base = { slab: { shape: "disc" as const, thickness: 1.2 }, marks: { text: [{ value: "A" }, { value: "B" }], numbers: true } };
    expect(mergeOptions(base, { slab: { thickness: 1 }, marks: { text: [{ value: "C" }] } })).toEqual({
      slab: { shape: "disc", thickness: 1 },
      marks: { text: [{ value: "C" }], numbers: true },
    });
  });

  it("the version history says what changed", () => {
    const v1 = { options: { slab: { shape: "disc" as const }, marks: { text: [{ value: "Thanks {customer}" }] } }, variables: defs };
    const v2 = {
      options: {
        slab: { shape: "disc" as const, cornerRadius: 8 },
        marks: { text: [{ value: "Thank you, {customer}!" }], qr: { value: "https://shop.example/{order}" } },
      },
      variables: defs,
    };
    expect(describeChanges(null, v1)).toEqual(["first version"]);
    expect(describeChanges(v1, v2)).toEqual([
      "cornerRadius: 5 → 8",
      'text line 1: "Thanks {customer}" → "Thank you, {customer}!"',
      'QR code added: "https://shop.example/{order}"',
    ]);
    expect(describeChanges(v1, v1)).toEqual(["no change to the options"]);
  });
});
