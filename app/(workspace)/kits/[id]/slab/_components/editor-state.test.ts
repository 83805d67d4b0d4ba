import { describe, expect, it } from "vitest";
import { readSlabSettings } from "@/lib/validation/kits";
import { editorStart, sameValues, settingsOf, templateSamples } from "./editor-state";
import { DEFAULT_VALUES } from "./form-model";
import type { EditorTemplate } from "./template-picker";

const template: EditorTemplate = {
  id: "t1",
  name: "Shop thanks",
  version: 2,
  starter: false,
  options: { slab: { shape: "disc" }, marks: { text: [{ value: "{shop} · {order}" }] } },
  variables: [
    { name: "shop", default: "Harbour Crafts", sample: "" },
    { name: "order", default: "", sample: "10482" },
  ],
};

describe("where the slab editor opens and what the kit keeps", () => {
  it("a template's Values fields take its samples, else its defaults", () => {
    expect(templateSamples(template)).toEqual({ shop: "Harbour Crafts", order: "10482" });
  });

  it("with nothing saved: the defaults", () => {
    expect(editorStart([template], null)).toEqual({ values: DEFAULT_VALUES, placements: undefined, applied: null });
  });

  it("the kit's saved slab comes back as it was saved: options, hand layout, values and template", () => {
    const placements = [{ piece: 1, x: 30, y: 40, rotation: 15 }];
    const edited = {
      values: {
        ...DEFAULT_VALUES,
        slab: { ...DEFAULT_VALUES.slab, gap: 0.25 },
        qr: { ...DEFAULT_VALUES.qr, value: "https://shop.example/o/{order}" },
        samples: { order: "7", customer: "Ana" },
      },
      placements,
      applied: template,
    };
    // Saved, stored as JSON, read back with the schema: the same state.
    const stored = JSON.parse(JSON.stringify(settingsOf(edited)));
    const back = editorStart([template], readSlabSettings(stored));
    expect(back.placements).toEqual(placements);
    expect(back.applied?.id).toBe("t1");
    expect(back.values.slab.gap).toBe(0.25);
    expect(back.values.qr.value).toBe("https://shop.example/o/{order}");
    expect(back.values.samples).toEqual({ order: "7", customer: "Ana" });
    expect(sameValues(back.values, edited.values)).toBe(true);
  });

  it("a template named in the address wins over the saved settings", () => {
    const saved = readSlabSettings({ options: { slab: { gap: 0.3 } } });
    const s = editorStart([template], saved, "t1");
    expect(s.applied?.id).toBe("t1");
    expect(s.values.slab.shape).toBe("disc");
    expect(s.values.samples).toEqual({ shop: "Harbour Crafts", order: "10482" });
  });

  it("a saved template that is gone leaves its options without it; a form the engine refuses is not kept", () => {
    const s = editorStart([], readSlabSettings({ options: { slab: { gap: 0.3 } }, template: { id: "gone", version: 1 } }));
    expect(s.applied).toBeNull();
    expect(s.values.slab.gap).toBe(0.3);
    expect(settingsOf({ ...s, values: { ...s.values, slab: { ...s.values.slab, thickness: NaN } } })).toBeNull();
  });
});
