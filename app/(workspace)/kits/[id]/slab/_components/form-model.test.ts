import { describe, expect, it } from "vitest";
import type { Finding } from "@/lib/geometry/checks";
import { DEFAULT_OPTIONS, slabOptionsSchema, type SlabOptionsInput } from "@/lib/geometry/options";
import { demoTemplate, STARTERS } from "@/lib/templates/starters";
import {
  BEDS,
  bedChoice,
  bedSize,
  DEFAULT_VALUES,
  fieldNotes,
  fieldPath,
  formDepth,
  formPath,
  formProblems,
  formToOptions,
  fromPosition,
  newLine,
  optionsToForm,
  toPosition,
  valuePlaceholders,
  type FormValues,
} from "./form-model";

const parse = (o: SlabOptionsInput) => slabOptionsSchema.parse(o);

// A template as a seller would save one: every section set, none at its default, and the two things
// the form does not hold (hand placements and piece numbers, which belong to a kit's plates).
const FULL: SlabOptionsInput = {
  slab: { shape: "contour", thickness: 1.4, gap: 0.25, cornerRadius: 3, margin: 6 },
  layout: {
    spacing: 4.5,
    bed: { width: 330, depth: 240 },
    copies: 2,
    placements: [{ piece: 1, x: 20, y: 30, rotation: 15 }],
    pieceNumbers: [4, 5, 6],
  },
  marks: {
    text: [
      {
        value: "ORDER {order}",
        size: 6,
        font: "mono-bold",
        relief: "emboss",
        depth: 0.6,
        position: { x: 12, y: 8 },
        maxWidth: 80,
        fit: "refuse",
      },
      { value: "Thanks, {customer}", position: "bottom" },
    ],
    qr: { value: "https://shop.example/o/{order}", module: 0.9, level: "Q", depth: "max", position: "top", maxSize: 40 },
    logo: {
      name: "Sail",
      paths: [{ d: "M0 0 L10 0 L5 8 Z", fillRule: "evenodd" }],
      box: { minX: 0, minY: 0, maxX: 10, maxY: 8 },
      width: 18,
      relief: "engrave",
      depth: 0.5,
      position: { x: -20, y: 5 },
    },
    numbers: false,
    numberStyle: { size: 5, font: "sans-bold" },
    ringStyle: { width: 1.2, clearance: 0.6, depth: "max" },
    outlines: "pocket",
  },
  material: "PETG",
  nozzle: 0.6,
  layerHeight: 0.28,
  firstLayerHeight: 0.3,
  pricePerKg: 31.5,
};
// The engine's floor rule (lib/geometry/options.ts, floorUnderMarks): every engraving leaves two
// layers and at least 0.4 mm under it. FULL: 1.4 mm slab, 0.28 mm layers → floor max(0.56, 0.4) =
// 0.56 mm, so "as deep as allowed" is 1.4 − 0.56 = 0.84 mm.
const FULL_DEEPEST = 0.84;

describe("round trips", () => {
  it("the editor's defaults: form → options → form gives the same values", () => {
    const back = optionsToForm(formToOptions(DEFAULT_VALUES), DEFAULT_VALUES.samples);
    expect(back).toEqual(DEFAULT_VALUES);
  });

  it("the editor's defaults are the engine's defaults, with the two sample lines and explicit 0.4 mm depths", () => {
    const o = parse(formToOptions(DEFAULT_VALUES));
    expect(o).toEqual({
      ...DEFAULT_OPTIONS,
      marks: {
        ...DEFAULT_OPTIONS.marks,
        text: [
          { value: "ORDER {order}", size: 5, font: "sans-bold", relief: "engrave", depth: 0.4, position: "auto", fit: "shrink" },
          { value: "Thank you, {customer}!", size: 4, font: "sans-bold", relief: "engrave", depth: 0.4, position: "auto", fit: "shrink" },
        ],
        numberStyle: { ...DEFAULT_OPTIONS.marks.numberStyle, depth: 0.4 },
        ringStyle: { ...DEFAULT_OPTIONS.marks.ringStyle, depth: 0.4 },
      },
    });
  });

  it("empty options (all engine defaults): options → form → options keeps every value", () => {
    const f = optionsToForm({});
    expect(f.bed).toBe("220x220");
    expect(f.text).toEqual([]);
    expect(f.qr).toEqual(DEFAULT_VALUES.qr);
    expect(f.logo).toBeNull();
    // A depth left out is the engine's 0.4 mm (the 1 mm default slab allows 1 − 0.4 = 0.6).
    expect(parse(formToOptions(f))).toEqual({
      ...DEFAULT_OPTIONS,
      marks: {
        ...DEFAULT_OPTIONS.marks,
        numberStyle: { ...DEFAULT_OPTIONS.marks.numberStyle, depth: 0.4 },
        ringStyle: { ...DEFAULT_OPTIONS.marks.ringStyle, depth: 0.4 },
      },
    });
  });

  it("a full template: options → form holds every field as people see it", () => {
    const f = optionsToForm(FULL, { order: "77001", customer: "Rowan" });
    expect(f).toEqual({
      slab: { shape: "contour", thickness: 1.4, gap: 0.25, cornerRadius: 3, margin: 6 },
      bed: "custom",
      bedWidth: 330,
      bedDepth: 240,
      spacing: 4.5,
      copies: 2,
      material: "PETG",
      nozzle: 0.6,
      layerHeight: 0.28,
      firstLayerHeight: 0.3,
      pricePerKg: 31.5,
      text: [
        {
          value: "ORDER {order}",
          size: 6,
          font: "mono-bold",
          relief: "emboss",
          depth: 0.6,
          where: "at",
          x: 12,
          y: 8,
          maxWidth: 80,
          fit: "refuse",
        },
        // The second line's left-out options come back as the engine's defaults.
        {
          value: "Thanks, {customer}",
          size: 5,
          font: "sans-bold",
          relief: "engrave",
          depth: 0.4,
          where: "bottom",
          x: 0,
          y: 0,
          maxWidth: NaN,
          fit: "shrink",
        },
      ],
      qr: {
        value: "https://shop.example/o/{order}",
        module: 0.9,
        level: "Q",
        relief: "engrave",
        depth: FULL_DEEPEST,
        where: "top",
        x: 0,
        y: 0,
        maxSize: 40,
      },
      logo: {
        name: "Sail",
        paths: [{ d: "M0 0 L10 0 L5 8 Z", fillRule: "evenodd" }],
        box: { minX: 0, minY: 0, maxX: 10, maxY: 8 },
        width: 18,
        relief: "engrave",
        depth: 0.5,
        where: "at",
        x: -20,
        y: 5,
      },
      numbers: false,
      numberStyle: { size: 5, font: "sans-bold", depth: 0.4 },
      outlines: "pocket",
      ringStyle: { width: 1.2, clearance: 0.6, depth: FULL_DEEPEST },
      samples: { order: "77001", customer: "Rowan" },
    } satisfies FormValues);
  });

  it('a full template: options → form → options is the same plate, depths "max" made numbers, kit-only options left out', () => {
    const expected = parse(FULL);
    const { placements: _p, pieceNumbers: _n, ...layout } = expected.layout;
    const back = parse(formToOptions(optionsToForm(FULL)));
    expect(back).toEqual({
      ...expected,
      layout,
      marks: {
        ...expected.marks,
        qr: { ...expected.marks.qr!, depth: FULL_DEEPEST },
        numberStyle: { ...expected.marks.numberStyle, depth: 0.4 },
        ringStyle: { ...expected.marks.ringStyle, depth: FULL_DEEPEST },
      },
    });
    // Hand placements travel beside the form values, not in them.
    expect(parse(formToOptions(optionsToForm(FULL), [{ piece: 1, x: 20, y: 30, rotation: 15 }])).layout.placements).toEqual([
      { piece: 1, x: 20, y: 30, rotation: 15 },
    ]);
  });

  it("every shipped template is a fixed point of form → options → form", () => {
    for (const t of [...STARTERS, demoTemplate()]) {
      const f = optionsToForm(t.options);
      expect(optionsToForm(formToOptions(f)), t.key).toEqual(f);
      expect(slabOptionsSchema.safeParse(formToOptions(f)).success, t.key).toBe(true);
    }
  });
});

describe("each field's conversion", () => {
  const values = (over: Partial<FormValues>): FormValues => ({ ...DEFAULT_VALUES, ...over });

  it("text lines: an empty or blank line is left out, a filled one sent as typed", () => {
    const o = formToOptions(values({ text: [newLine("", 4), newLine("   ", 4), newLine(" SET 7 ", 4)] }));
    expect(o.marks?.text).toHaveLength(1);
    expect(o.marks?.text?.[0]?.value).toBe(" SET 7 "); // the schema trims it
    expect(parse(o).marks.text[0]?.value).toBe("SET 7");
  });

  // An emptied <input type="number"> has valueAsNumber NaN (HTML Living Standard, the input element's
  // valueAsNumber for type=number); react-hook-form's `valueAsNumber` register option maps "" to NaN
  // the same way (getFieldValueAs in react-hook-form 7).
  it("optional numbers: an empty field (NaN) leaves the option out, a number is sent", () => {
    const empty = formToOptions(values({ text: [newLine("A", 4)], qr: { ...DEFAULT_VALUES.qr, value: "Q", maxSize: NaN } }));
    expect(empty.marks?.text?.[0]).not.toHaveProperty("maxWidth");
    expect(empty.marks?.qr).not.toHaveProperty("maxSize");
    const set = formToOptions(
      values({ text: [{ ...newLine("A", 4), maxWidth: 60 }], qr: { ...DEFAULT_VALUES.qr, value: "Q", maxSize: 25 } }),
    );
    expect(set.marks?.text?.[0]?.maxWidth).toBe(60);
    expect(set.marks?.qr?.maxSize).toBe(25);
  });

  it('a line\'s fit goes both ways: a saved "refuse" is not lost to the default "shrink"', () => {
    const o = formToOptions(values({ text: [{ ...newLine("A", 4), fit: "refuse" }, newLine("B", 4)] }));
    expect(parse(o).marks.text.map((t) => t.fit)).toEqual(["refuse", "shrink"]);
    expect(optionsToForm(o).text.map((t) => t.fit)).toEqual(["refuse", "shrink"]);
    // A line saved before lines had a fit (no `fit` key) comes back as the engine's default.
    expect(optionsToForm({ marks: { text: [{ value: "C" }] } }).text[0]?.fit).toBe("shrink");
  });

  it('required numbers: an empty field is refused at that field as "Enter a number."', () => {
    const problems = formProblems(
      values({ slab: { ...DEFAULT_VALUES.slab, thickness: NaN }, bed: "custom", bedWidth: NaN, bedDepth: 300 }),
    );
    expect(problems).toContainEqual({ path: "slab.thickness", type: "invalid_type", message: "Enter a number." });
    expect(problems).toContainEqual({ path: "bedWidth", type: "invalid_type", message: "Enter a number." });
    expect(problems.map((p) => p.path)).not.toContain("bedDepth");
  });

  it("the defaults pass the engine's schema: no problems", () => {
    expect(formProblems(DEFAULT_VALUES)).toEqual([]);
  });

  it("an out-of-range number keeps the schema's own message", () => {
    // The gap's range in the options table is 0.1–0.5 mm; zod words its range messages "Too big:
    // expected number to be <=0.5", which must not be read as an empty field.
    const [big] = formProblems(values({ slab: { ...DEFAULT_VALUES.slab, gap: 0.9 } }));
    expect(big).toMatchObject({ path: "slab.gap", type: "too_big" });
    expect(big?.message).not.toBe("Enter a number.");
    expect(big?.message).toMatch(/0\.5/);
    const [small] = formProblems(values({ slab: { ...DEFAULT_VALUES.slab, gap: 0.01 } }));
    expect(small).toMatchObject({ path: "slab.gap", type: "too_small" });
    expect(small?.message).toMatch(/0\.1/);
  });

  it("the QR code: an empty or blank value means no code", () => {
    expect(formToOptions(values({ qr: { ...DEFAULT_VALUES.qr, value: "" } })).marks).not.toHaveProperty("qr");
    expect(formToOptions(values({ qr: { ...DEFAULT_VALUES.qr, value: "  " } })).marks).not.toHaveProperty("qr");
    expect(
      formToOptions(values({ qr: { ...DEFAULT_VALUES.qr, value: "https://shop.example/o/1", where: "at", x: 5, y: 6 } })).marks?.qr,
    ).toMatchObject({ value: "https://shop.example/o/1", position: { x: 5, y: 6 } });
  });

  it("the logo: none leaves the option out", () => {
    expect(formToOptions(DEFAULT_VALUES).marks).not.toHaveProperty("logo");
  });

  it('depths: "max" shows as the deepest allowed, a left-out depth as 0.4 mm or the deepest when less', () => {
    // 1 mm slab, 0.2 mm layers: floor max(2 × 0.2, 0.4) = 0.4, deepest 0.6.
    const standard = { layerHeight: 0.2, slab: { ...DEFAULT_OPTIONS.slab, thickness: 1 } };
    expect(formDepth("max", standard)).toBe(0.6);
    expect(formDepth(undefined, standard)).toBe(0.4);
    expect(formDepth(0.3, standard)).toBe(0.3);
    // 0.6 mm slab: deepest 0.6 − 0.4 = 0.2, so a left-out depth is 0.2, not 0.4.
    const thin = { layerHeight: 0.2, slab: { ...DEFAULT_OPTIONS.slab, thickness: 0.6 } };
    expect(formDepth("max", thin)).toBe(0.2);
    expect(formDepth(undefined, thin)).toBe(0.2);
    // 0.3 mm layers on 1.2 mm: floor 0.6, deepest 0.6; rounded to 0.01 mm for the field.
    expect(formDepth("max", { layerHeight: 0.3, slab: { ...DEFAULT_OPTIONS.slab, thickness: 1.2 } })).toBe(0.6);
  });

  it("beds: every preset by its key, any other size as custom (width and depth are not swapped)", () => {
    for (const [w, d] of BEDS) {
      const key = bedChoice({ width: w, depth: d });
      expect(key).toBe(`${w}x${d}`);
      expect(bedSize({ bed: key, bedWidth: 1, bedDepth: 1 })).toEqual({ width: w, depth: d });
    }
    expect(bedChoice({ width: 210, depth: 250 })).toBe("custom");
    expect(bedChoice({ width: 333, depth: 222 })).toBe("custom");
    expect(bedSize({ bed: "custom", bedWidth: 333, bedDepth: 222 })).toEqual({ width: 333, depth: 222 });
    // A preset ignores the custom fields.
    expect(formToOptions(values({ bed: "250x210", bedWidth: 999, bedDepth: 999 })).layout?.bed).toEqual({ width: 250, depth: 210 });
    expect(formToOptions(values({ bed: "custom", bedWidth: 410, bedDepth: 305 })).layout?.bed).toEqual({ width: 410, depth: 305 });
  });

  it('positions: named places as they are, "at" as x / y, and back', () => {
    expect(toPosition("top", 3, 4)).toBe("top");
    expect(toPosition("at", 3, 4)).toEqual({ x: 3, y: 4 });
    expect(fromPosition({ x: -2, y: 7.5 })).toEqual({ where: "at", x: -2, y: 7.5 });
    expect(fromPosition("bottom")).toEqual({ where: "bottom", x: 0, y: 0 });
  });

  it("placeholders to fill: in order of first use, without {date} and {kit}, not from emptied lines", () => {
    const f = {
      text: [newLine("{kit} for {customer}", 4), newLine("", 4), newLine("{date} {order} {customer}", 4)],
      qr: { ...DEFAULT_VALUES.qr, value: "https://shop.example/{ref}" },
    };
    expect(valuePlaceholders(f)).toEqual(["customer", "order", "ref"]);
    expect(valuePlaceholders(DEFAULT_VALUES)).toEqual(["order", "customer"]);
  });
});

describe("messages at their fields", () => {
  it("option paths map to form fields", () => {
    expect(formPath(["layout", "bed"])).toBe("bed");
    expect(formPath(["layout", "bed", "width"])).toBe("bedWidth");
    expect(formPath(["layout", "bed", "depth"])).toBe("bedDepth");
    expect(formPath(["layout", "spacing"])).toBe("spacing");
    expect(formPath(["slab", "gap"])).toBe("slab.gap");
    expect(formPath(["marks", "text", 1, "size"])).toBe("text.1.size");
    expect(formPath(["marks", "text", 1, "position"])).toBe("text.1.x");
    expect(formPath(["marks", "text", 1, "position", "y"])).toBe("text.1.y");
    expect(formPath(["marks", "qr", "position", "y"])).toBe("qr.y");
    expect(formPath(["marks", "qr", "module"])).toBe("qr.module");
    expect(formPath(["marks", "logo"])).toBe("logo.width");
    expect(formPath(["marks", "numberStyle", "depth"])).toBe("numberStyle.depth");
    expect(formPath(["nozzle"])).toBe("nozzle");
  });

  it("a text line's index among the sent lines is turned back to its place in the form", () => {
    const values = { text: [newLine("", 4), newLine("A", 4), newLine(" ", 4), newLine("B", 4)] };
    expect(fieldPath(["marks", "text", 0, "size"], values)).toBe("text.1.size");
    expect(fieldPath(["marks", "text", 1, "depth"], values)).toBe("text.3.depth");
    // A text too long for the schema (at most 120 characters) on the second sent line.
    const long = { ...DEFAULT_VALUES, text: [newLine("", 4), newLine("A", 4), newLine("x".repeat(121), 4)] };
    expect(formProblems(long).map((p) => p.path)).toEqual(["text.2.value"]);
  });

  // The fields lib/geometry/text-fit.ts gives its findings: a shrunk line at its size, a refused
  // one at its size (a smaller printable size would fit) or its value (none would), by engine index.
  it("a text line's fit findings show at that line's size or value, past an emptied line", () => {
    const findings: Finding[] = [
      { severity: "warning", code: "text_shrunk", message: "Text line 1 was reduced", field: ["marks", "text", 0, "size"] },
      { severity: "error", code: "text_too_long", message: "Text line 2 is 9.0 mm too long", field: ["marks", "text", 1, "value"] },
    ];
    const notes = fieldNotes(findings, { text: [newLine("A", 4), newLine("", 4), newLine("B", 4)] });
    expect(notes.get("text.0.size")?.map((n) => n.code)).toEqual(["text_shrunk"]);
    expect(notes.get("text.2.value")).toEqual([{ severity: "error", code: "text_too_long", message: "Text line 2 is 9.0 mm too long" }]);
  });

  it("findings: only errors and warnings that name a field, grouped by field", () => {
    const findings: Finding[] = [
      { severity: "error", code: "mark_too_deep", message: "too deep", field: ["marks", "numberStyle", "depth"] },
      { severity: "warning", code: "stroke_too_thin", message: "thin", field: ["marks", "numberStyle", "depth"] },
      { severity: "info", code: "gap_sliced", message: "fyi", field: ["slab", "gap"] },
      { severity: "error", code: "pieces_overlap", message: "overlap", piece: 1 },
      { severity: "warning", code: "text_too_long", message: "wide", field: ["marks", "text", 0, "maxWidth"] },
    ];
    const notes = fieldNotes(findings, { text: [newLine("", 4), newLine("A", 4)] });
    expect([...notes.keys()]).toEqual(["numberStyle.depth", "text.1.maxWidth"]);
    expect(notes.get("numberStyle.depth")?.map((n) => n.code)).toEqual(["mark_too_deep", "stroke_too_thin"]);
  });
});
