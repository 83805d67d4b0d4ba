import { inflateSync } from "node:zlib";
import { PDFArray, PDFDocument, PDFName, PDFRawStream, type PDFPage } from "pdf-lib";
import { describe, expect, it } from "vitest";
import { plateMapPdf, type SheetPlate } from "./sheet";

// The plate map PDF read back with pdf-lib (pages, their size, the drawn slab) and pdf.js (its words).
const PT = 72 / 25.4; // PDF user space: 1/72 in (ISO 32000-1 §8.3.2.3); 1 in = 25.4 mm
const rect = (x: number, y: number, w: number, d: number): [number, number][] => [
  [x, y],
  [x + w, y],
  [x + w, y + d],
  [x, y + d],
];
const piece = (number: number, x: number, y: number, side: number) => ({
  number,
  partName: `part ${number}`,
  copy: 1,
  partId: "part-1",
  outline: [rect(x, y, side, side)],
  bounds: { minX: x, minY: y, maxX: x + side, maxY: y + side },
});
const plate = (width: number, depth: number): SheetPlate => ({
  id: "0d9c4e7a-1111-4222-8333-944445555666",
  title: "Harbour Run token set",
  reference: "ORD-1042",
  createdAt: new Date("2026-03-02T10:00:00Z"),
  options: {},
  variables: {},
  findings: [],
  estimates: null,
  layout: {
    slab: { shape: "rectangle", width, depth, outline: [rect(0, 0, width, depth)], thickness: 1 },
    bed: { width: 400, depth: 400 },
    utilisation: 0.3,
    marks: [],
  } as unknown as SheetPlate["layout"],
  // A 30 mm tile and a 2 mm pin whose number cannot stand inside it.
  pieces: [piece(1, 10, 10, 30), piece(2, 50, 10, 2)] as unknown as SheetPlate["pieces"],
});

async function words(bytes: Uint8Array): Promise<string[]> {
  const pdfjs = await import("pdfjs-dist/legacy/build/pdf.mjs");
  const doc = await pdfjs.getDocument({ data: bytes.slice(), useSystemFonts: false, isEvalSupported: false }).promise;
  const out: string[] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const c = await (await doc.getPage(i)).getTextContent();
    out.push(c.items.map((it) => ("str" in it ? it.str : "")).join(" "));
  }
  return out;
}

/** The x and y extent (mm) of the first path filled in the slab's colour on a page. */
function slabExtent(doc: PDFDocument, page: PDFPage): { w: number; h: number } {
  const contents = page.node.Contents();
  const refs = contents instanceof PDFArray ? contents.asArray() : [contents];
  const text = refs
    .map((ref) => {
      const s = doc.context.lookup(ref as never) as PDFRawStream;
      const raw = Buffer.from(s.getContents());
      return (s.dict.get(PDFName.of("Filter")) ? inflateSync(raw) : raw).toString("latin1");
    })
    .join("\n");
  const start = text.indexOf("0.94 0.91 0.86 rg");
  const body = text.slice(start, text.indexOf("\nf", start));
  const pts = [...body.matchAll(/(-?[\d.]+) (-?[\d.]+) [ml]/g)].map((m) => [Number(m[1]), Number(m[2])]);
  const xs = pts.map((p) => p[0]!),
    ys = pts.map((p) => p[1]!);
  return { w: (Math.max(...xs) - Math.min(...xs)) / PT, h: (Math.max(...ys) - Math.min(...ys)) / PT };
}

describe("the plate map PDF", () => {
  it("draws a 144 × 195 mm slab at 1:1 on a page of its own, after an overview whose scale it states", async () => {
    const bytes = await plateMapPdf(plate(144, 195), "http://localhost/floor/plates/x", "a4");
    const doc = await PDFDocument.load(bytes);
    expect(doc.getPageCount()).toBe(2);
    for (const p of doc.getPages()) {
      // ISO 216: A4 is 210 × 297 mm.
      expect(p.getSize().width).toBeCloseTo(210 * PT, 2);
      expect(p.getSize().height).toBeCloseTo(297 * PT, 2);
    }
    const [first, second] = await words(bytes);
    expect(first).toContain("Overview at 1:1.65");
    expect(first).toContain("the slab at 1:1 is on page 2");
    expect(first).toContain("ORD-1042 · Harbour Run token set");
    expect(second).toContain("Page 2 of 2");
    expect(second).toContain("Scale 1:1");
    // The drawn slab measures what the slab does (coordinates are written to 0.01 pt).
    const drawn = slabExtent(doc, doc.getPage(1));
    expect(drawn.w).toBeCloseTo(144, 1);
    expect(drawn.h).toBeCloseTo(195, 1);
    // On the first page it is drawn at the overview's scale: 118 mm of room for 195 mm.
    expect(slabExtent(doc, doc.getPage(0)).h).toBeCloseTo(118, 1);
  });

  it("keeps a slab that fits on the first page at 1:1 in one page", async () => {
    const bytes = await plateMapPdf(plate(120, 90), "http://localhost/floor/plates/x", "letter");
    const doc = await PDFDocument.load(bytes);
    expect(doc.getPageCount()).toBe(1);
    // ANSI/ASME Y14.1 Letter: 8.5 × 11 in = 612 × 792 pt.
    expect(doc.getPage(0).getSize()).toEqual({ width: expect.closeTo(612, 2), height: expect.closeTo(792, 2) });
    expect(slabExtent(doc, doc.getPage(0)).w).toBeCloseTo(120, 1);
    expect((await words(bytes))[0]).toContain("Scale 1:1");
  });

  it("tiles a slab larger than the paper at 1:1 over labelled pages, and A3 takes it in fewer", async () => {
    const a4 = await plateMapPdf(plate(400, 300), "http://localhost/floor/plates/x", "a4");
    const doc = await PDFDocument.load(a4);
    // 186 × 247 mm of room a page, 10 mm overlap: 3 columns × 2 rows, after the overview.
    expect(doc.getPageCount()).toBe(7);
    const text = await words(a4);
    expect(text[0]).toContain("pages 2–7");
    expect(text[1]).toContain("Page 2 of 7 · column 1 of 3, row 1 of 2");
    expect(text[6]).toContain("Page 7 of 7 · column 3 of 3, row 2 of 2");
    expect(text[1]).toContain("overlap: page 3");
    expect(text[1]).toContain("This bar is 50 mm long");
    const a3 = await PDFDocument.load(await plateMapPdf(plate(400, 300), "http://localhost/floor/plates/x", "a3"));
    // ISO 216 A3, 297 × 420 mm: 273 × 370 mm of room, so 2 columns × 1 row.
    expect(a3.getPageCount()).toBe(3);
    expect(a3.getPage(1).getSize().width).toBeCloseTo(297 * PT, 2);
  });
});
