import { beforeAll, describe, expect, it } from "vitest";
import { engine } from "@/tests/support/engine";
import { buildPlate, type PlatePart } from "./build-plate";
import { hexTile } from "./demo-shapes";
import type { FontBook } from "./fonts";
import type { Kernel } from "./kernel";
import { importSvgLogo, LogoError, logoContours, type LogoErrorCode } from "./marks/logo";
import { signedVolume } from "./mesh";
import { orientMesh } from "./orient";

let kernel: Kernel;
let fonts: FontBook;
beforeAll(async () => {
  ({ kernel, fonts } = await engine());
});

const svg = (body: string, attrs = 'viewBox="0 0 100 50"') =>
  `<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" ${attrs}>${body}</svg>`;

/** Area of the logo at `width` mm as the kernel fills it (each path with its rule, then the union). */
function area(logo: ReturnType<typeof importSvgLogo>, width: number): number {
  const { CrossSection } = kernel.wasm;
  const scope = kernel.scope();
  try {
    const parts = logoContours(logo, width).map((p) =>
      scope.track(new CrossSection(p.contours, p.fillRule === "evenodd" ? "EvenOdd" : "NonZero")),
    );
    return scope.track(CrossSection.union(parts)).area();
  } finally {
    scope.close();
  }
}

const refused = (text: string, code: LogoErrorCode) => {
  let err: unknown;
  try {
    importSvgLogo(text);
  } catch (e) {
    err = e;
  }
  expect(err).toBeInstanceOf(LogoError);
  expect((err as LogoError).code).toBe(code);
  expect((err as LogoError).message.length).toBeGreaterThan(20);
  return err as LogoError;
};

describe("SVG logos: geometry in, areas as the handbook has them", () => {
  it("a rect in a translated group and a circle: w·h + πr², at the drawing's own scale", () => {
    const logo = importSvgLogo(
      svg('<g transform="translate(10 0)"><rect x="0" y="0" width="40" height="50"/></g><circle cx="80" cy="25" r="20"/>'),
    );
    expect(logo.box).toEqual({ minX: 10, minY: -50, maxX: 100, maxY: 0 }); // y up
    // 90 units wide shown 90 mm wide: scale 1. Circle flattened with 0.01 mm chords falls short by < 0.1 %.
    const a = area(logo, 90);
    expect(a).toBeGreaterThan(2000 + Math.PI * 400 * 0.999);
    expect(a).toBeLessThanOrEqual(2000 + Math.PI * 400 + 1e-6);
    // Scaled to 45 mm wide, the area is a quarter (areas go with the square of the scale).
    expect(Math.abs(area(logo, 45) / (a / 4) - 1)).toBeLessThan(1e-3);
  });

  it("fill-rule (SVG 1.1 §11.3): evenodd leaves the inner square empty, nonzero with the same winding fills it", () => {
    const d = "M0 0H40V40H0Z M10 10H30V30H10Z";
    expect(area(importSvgLogo(svg(`<path fill-rule="evenodd" d="${d}"/>`)), 40)).toBeCloseTo(1600 - 400, 6);
    expect(area(importSvgLogo(svg(`<path d="${d}"/>`)), 40)).toBeCloseTo(1600, 6);
    // The same rule given in a style attribute, inherited from a group.
    expect(area(importSvgLogo(svg(`<g style="fill-rule: evenodd"><path d="${d}"/></g>`)), 40)).toBeCloseTo(1200, 6);
  });

  it("transforms and arcs: a 10-unit square scaled by 2 and turned 45° keeps 400 units², a rounded rect loses (4 − π)r²", () => {
    const turned = importSvgLogo(svg('<path transform="rotate(45) scale(2)" d="M0 0 h10 v10 h-10 z"/>'));
    const w = turned.box.maxX - turned.box.minX;
    expect(w).toBeCloseTo(20 * Math.SQRT2, 3);
    expect(area(turned, w)).toBeCloseTo(400, 2); // path data is kept to 4 decimals
    const rounded = importSvgLogo(svg('<rect width="40" height="20" rx="5"/>'));
    expect(area(rounded, 40)).toBeCloseTo(800 - (4 - Math.PI) * 25, 0);
  });

  it("ignores unfilled shapes, titles and metadata; refuses a drawing of strokes only and one with no shapes", () => {
    const logo = importSvgLogo(
      svg(
        '<title>Marrowby mark</title><metadata><x>1</x></metadata><rect width="10" height="10"/><line x1="0" y1="0" x2="50" y2="50" ' +
          'stroke="black"/><circle r="5" fill="none" stroke="black"/>',
      ),
    );
    expect(logo.paths).toHaveLength(1);
    refused(svg('<line x1="0" y1="0" x2="50" y2="50" stroke="black"/>'), "svg_stroke_only");
    refused(svg("<g/>"), "svg_empty");
  });
});

describe("SVG logos: what is not geometry is refused, with what to change", () => {
  it("scripts, in any form", () => {
    refused(svg('<script>alert(1)</script><rect width="10" height="10"/>'), "svg_script");
    refused(svg('<rect width="10" height="10" onclick="alert(1)"/>'), "svg_script");
    refused(svg('<rect width="10" height="10"/>', 'viewBox="0 0 10 10" onload="fetch(1)"'), "svg_script");
  });

  it("external references: an href elsewhere, a url() fill, a reused shape, a processing instruction", () => {
    refused(svg('<image href="https://tracker.example/p.png" width="10" height="10"/>'), "svg_external");
    refused(svg('<rect width="10" height="10" fill="url(https://fonts.example/x.svg#g)"/>'), "svg_external");
    refused(svg('<defs><rect id="a" width="5" height="5"/></defs><use href="#a"/>'), "svg_external");
    refused(
      `<?xml version="1.0"?><?xml-stylesheet href="https://x.example/s.css"?><svg xmlns="http://www.w3.org/2000/svg"><rect width="1" height="1"/></svg>`,
      "svg_external",
    );
  });

  it("entity expansion and document types (a classic denial of service) are refused before any expansion", () => {
    const bomb = `<?xml version="1.0"?><!DOCTYPE svg [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;&a;&a;&a;&a;&a;">]><svg xmlns="http://www.w3.org/2000/svg"><text>&b;</text></svg>`;
    refused(bomb, "svg_invalid");
  });

  it("images, live text, style sheets and other non-geometry elements", () => {
    refused(svg('<image href="data:image/png;base64,AAAA" width="10" height="10"/>'), "svg_image");
    refused(svg("<text>Marrowby</text>"), "svg_not_geometry");
    refused(svg("<style>rect{fill:red}</style>"), "svg_not_geometry");
    refused(svg('<linearGradient id="g"/><rect width="1" height="1"/>'), "svg_not_geometry");
    refused("<html><body>no</body></html>", "svg_invalid");
    refused("<svg xmlns='http://www.w3.org/2000/svg'><rect", "svg_invalid");
  });

  it("huge drawings: over 1 MB, over 60 000 points once flattened", () => {
    refused(svg(`<desc>${"x".repeat(1024 * 1024)}</desc><rect width="1" height="1"/>`), "svg_too_large");
    // A jagged outline of 70 000 corners, under the byte limit.
    const pts = Array.from({ length: 70_000 }, (_, i) => `${i % 2}${i % 7} ${i}`).join(" ");
    const e = refused(svg(`<polygon points="${pts}"/>`), "svg_too_complex");
    expect(e.message).toMatch(/70,000 points/);
  });
});

describe("a logo on the slab", () => {
  const tile = (): PlatePart[] => [{ id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 3 }];
  const logo = importSvgLogo(svg('<rect width="40" height="20"/><circle cx="60" cy="10" r="10"/>', 'viewBox="0 0 70 20"'));

  it("is engraved: the slab loses the logo's area × depth, and the logo sits inside the slab clear of the pieces", () => {
    const base = { marks: { numbers: false, outlines: "none" as const } };
    const without = buildPlate(kernel, { parts: tile(), fonts, options: base, formats: [] });
    const withLogo = buildPlate(kernel, {
      parts: tile(),
      fonts,
      options: { marks: { ...base.marks, logo: { ...logo, width: 35, depth: 0.4 } } },
      formats: [],
    });
    expect(withLogo.findings.filter((f) => f.severity === "error")).toEqual([]);
    const mark = withLogo.layout!.marks.find((m) => m.kind === "logo")!;
    expect(mark.bounds.maxX - mark.bounds.minX).toBeCloseTo(35, 6);
    expect(mark.bounds.maxY - mark.bounds.minY).toBeCloseTo(10, 6); // 70 × 20 at 35 mm wide
    for (const p of withLogo.pieces)
      expect(p.bounds.minY > mark.bounds.maxY || p.bounds.maxY < mark.bounds.minY || p.bounds.minX > mark.bounds.maxX).toBe(true);
    // Engraved volume = area × depth: slab volume = outline area × thickness − logo area × depth,
    // the logo at half scale: (40·20 + π·10²)/4 mm² (rectangle and circle areas).
    const logoArea = (800 + Math.PI * 100) / 4;
    const scope = kernel.scope();
    try {
      const outline = scope.track(new kernel.wasm.CrossSection(withLogo.layout!.slab.outline, "Positive")).area();
      const slab = withLogo.bodies!.find((b) => b.piece === undefined)!.mesh;
      expect(signedVolume(slab)).toBeCloseTo(outline * 1.0 - logoArea * 0.4, 0);
      expect(without.layout!.marks).toEqual([]);
    } finally {
      scope.close();
    }
  });

  it("hairline strokes in a logo are a finding, as for text", () => {
    const thin = importSvgLogo(svg('<rect width="100" height="0.5"/><rect y="5" width="100" height="0.5"/>', 'viewBox="0 0 100 6"'));
    const r = buildPlate(kernel, { parts: tile(), fonts, options: { marks: { logo: { ...thin, width: 30 } } }, formats: [] });
    expect(r.findings.map((f) => f.code)).toContain("stroke_too_thin");
  });
});

describe("room for a template's values", () => {
  const tile = (): PlatePart[] => [{ id: "tile", name: "Harbour tile", mesh: orientMesh(hexTile()), quantity: 2 }];
  it("a text line longer than its maxWidth is an error that says by how much", () => {
    const r = buildPlate(kernel, {
      parts: tile(),
      fonts,
      options: { marks: { text: [{ value: "Thank you, {customer}!", size: 5, maxWidth: 40, fit: "refuse" }] } },
      variables: { customer: "Bartholomew Quennell-Ashdown" },
      formats: [],
    });
    const f = r.findings.find((x) => x.code === "text_too_long")!;
    expect(f.severity).toBe("error");
    expect(f.message).toMatch(/^Text line 1 .* is \d+\.\d mm too long: .* its line allows 40 mm/);
    const ok = buildPlate(kernel, {
      parts: tile(),
      fonts,
      options: { marks: { text: [{ value: "Thank you, {customer}!", size: 5, maxWidth: 80 }] } },
      variables: { customer: "Sam" },
      formats: [],
    });
    expect(ok.findings.map((x) => x.code)).not.toContain("text_too_long");
  });

  it("a QR value too long for maxSize says how many characters to cut, and cutting them fits", () => {
    const value = `https://shop.example/orders/${"x".repeat(60)}`;
    const r = buildPlate(kernel, { parts: tile(), fonts, options: { marks: { qr: { value, module: 1, maxSize: 35 } } }, formats: [] });
    const f = r.findings.find((x) => x.code === "qr_too_large")!;
    const cut = Number(/by (\d+) characters/.exec(f.message)![1]);
    expect(cut).toBeGreaterThan(0);
    const fits = buildPlate(kernel, {
      parts: tile(),
      fonts,
      options: { marks: { qr: { value: value.slice(0, value.length - cut), module: 1, maxSize: 35 } } },
      formats: [],
    });
    expect(fits.findings.map((x) => x.code)).not.toContain("qr_too_large");
    const oneMore = buildPlate(kernel, {
      parts: tile(),
      fonts,
      options: { marks: { qr: { value: value.slice(0, value.length - cut + 1), module: 1, maxSize: 35 } } },
      formats: [],
    });
    expect(oneMore.findings.map((x) => x.code)).toContain("qr_too_large");
  });
});
