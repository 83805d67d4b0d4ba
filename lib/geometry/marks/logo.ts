import { SaxesParser, type SaxesTagNS } from "saxes";
import svgpath from "svgpath";
import type { LogoMark } from "../options";
import { flattenPath, TEXT_TOLERANCE, type Contour, type PathCommand } from "./text";

/**
 * A logo for the slab from an SVG drawing: only geometry is taken — paths and the basic shapes
 * (rect, circle, ellipse, polygon, polyline) with their transforms and fill rule. Scripts, external
 * references, images, text, styles and everything else that is not plain geometry are refused with a
 * message that says what to change. The outlines are kept as path data (absolute, arcs as cubic
 * curves, y up) and flattened at build time at the logo's real size, with the same chord tolerance as
 * text.
 */

export type LogoErrorCode =
  | "svg_invalid"
  | "svg_script"
  | "svg_external"
  | "svg_image"
  | "svg_not_geometry"
  | "svg_too_large"
  | "svg_too_complex"
  | "svg_empty"
  | "svg_stroke_only";

export class LogoError extends Error {
  constructor(
    readonly code: LogoErrorCode,
    message: string,
  ) {
    super(message);
    this.name = "LogoError";
  }
}

export const LOGO_LIMITS = { bytes: 1024 * 1024, elements: 5000, paths: 500, pathChars: 900_000, points: 60_000 } as const;

export type LogoPaths = {
  paths: { d: string; fillRule: "nonzero" | "evenodd" }[];
  box: { minX: number; minY: number; maxX: number; maxY: number };
};

const SHAPES = new Set(["path", "rect", "circle", "ellipse", "polygon", "polyline", "line"]);
const CONTAINERS = new Set(["svg", "g"]);
/** Carry no geometry and no risk: their content is skipped. */
const SKIPPED = new Set(["title", "desc", "metadata"]);
const REFUSED: Record<string, [LogoErrorCode, string]> = {
  script: ["svg_script", "The drawing contains a script. Logos are geometry only: export it again without scripts."],
  image: [
    "svg_image",
    "The drawing contains an embedded picture (<image>). Only outlines can be engraved: trace the picture into paths first.",
  ],
  foreignObject: ["svg_not_geometry", "The drawing embeds other content (<foreignObject>). Only outlines can be engraved."],
  use: [
    "svg_external",
    'The drawing reuses shapes by reference (<use>). Expand the references into plain shapes ("unlink clones") and export again.',
  ],
  text: [
    "svg_not_geometry",
    "The drawing holds live text (<text>). Convert the text to outlines (paths) in your drawing program and export again.",
  ],
  style: [
    "svg_not_geometry",
    "The drawing holds a style sheet (<style>). Export it with presentation attributes (fill, fill-rule) instead of CSS.",
  ],
};

const num = (v: string | undefined, what: string, fallback?: number): number => {
  if (v === undefined || v === "") {
    if (fallback !== undefined) return fallback;
    throw new LogoError("svg_invalid", `A shape is missing its ${what}.`);
  }
  const m = /^\s*([-+]?(?:\d+\.?\d*|\.\d+)(?:e[-+]?\d+)?)\s*(px)?\s*$/i.exec(v);
  if (!m) throw new LogoError("svg_invalid", `"${v}" is not a plain number (${what}); units other than px and percentages are not read.`);
  return Number(m[1]);
};

const points = (v: string | undefined): number[] =>
  (v ?? "")
    .trim()
    .split(/[\s,]+/)
    .filter(Boolean)
    .map((p) => num(p, "points"));

function shapeToPath(name: string, a: Record<string, string>): string | null {
  switch (name) {
    case "path":
      return a.d ?? "";
    case "rect": {
      const x = num(a.x, "x", 0),
        y = num(a.y, "y", 0),
        w = num(a.width, "width"),
        h = num(a.height, "height");
      if (w <= 0 || h <= 0) return null;
      let rx = a.rx !== undefined ? num(a.rx, "rx") : a.ry !== undefined ? num(a.ry, "ry") : 0;
      let ry = a.ry !== undefined ? num(a.ry, "ry") : rx;
      rx = Math.min(rx, w / 2);
      ry = Math.min(ry, h / 2);
      if (rx <= 0 || ry <= 0) return `M${x} ${y}H${x + w}V${y + h}H${x}Z`;
      return (
        `M${x + rx} ${y}H${x + w - rx}A${rx} ${ry} 0 0 1 ${x + w} ${y + ry}V${y + h - ry}A${rx} ${ry} 0 0 1 ${x + w - rx} ` +
        `${y + h}H${x + rx}A${rx} ${ry} 0 0 1 ${x} ${y + h - ry}V${y + ry}A${rx} ${ry} 0 0 1 ${x + rx} ${y}Z`
      );
    }
    case "circle":
    case "ellipse": {
      const cx = num(a.cx, "cx", 0),
        cy = num(a.cy, "cy", 0);
      const rx = name === "circle" ? num(a.r, "r") : num(a.rx, "rx"),
        ry = name === "circle" ? rx : num(a.ry, "ry");
      if (rx <= 0 || ry <= 0) return null;
      return `M${cx - rx} ${cy}A${rx} ${ry} 0 1 0 ${cx + rx} ${cy}A${rx} ${ry} 0 1 0 ${cx - rx} ${cy}Z`;
    }
    case "polygon":
    case "polyline": {
      const p = points(a.points);
      if (p.length < 6) return null;
      let d = `M${p[0]} ${p[1]}`;
      for (let i = 2; i + 1 < p.length; i += 2) d += `L${p[i]} ${p[i + 1]}`;
      return `${d}Z`; // a filled polyline is closed, as SVG fills it
    }
    default:
      return null;
  }
}

/** Read and check an SVG logo. Throws a LogoError that says what to change. */
export function importSvgLogo(svg: string | Uint8Array): LogoPaths {
  const bytes = typeof svg === "string" ? new TextEncoder().encode(svg).byteLength : svg.byteLength;
  if (bytes > LOGO_LIMITS.bytes)
    throw new LogoError(
      "svg_too_large",
      `The drawing is ${(bytes / 1024 / 1024).toFixed(1)} MB; a logo may be at most ${LOGO_LIMITS.bytes / 1024 / 1024} MB. Simplify ` +
        `it or remove hidden layers.`,
    );
  const text = typeof svg === "string" ? svg : new TextDecoder().decode(svg);
  const parser = new SaxesParser({ xmlns: true });
  const stack: {
    name: string;
    transform: string;
    fill: string | undefined;
    fillRule: string | undefined;
    stroke: string | undefined;
    skip: boolean;
  }[] = [];
  const paths: LogoPaths["paths"] = [];
  let elements = 0;
  let chars = 0;
  let strokeOnly = 0;
  let sawRoot = false;
  let problem: LogoError | null = null;
  const refuse = (e: LogoError) => {
    problem ??= e;
  };
  parser.on("doctype", () =>
    refuse(new LogoError("svg_invalid", "The file declares a document type (DTD); logos must be plain SVG without one.")),
  );
  parser.on("processinginstruction", (pi) => {
    if (pi.target !== "xml")
      refuse(new LogoError("svg_external", `The file holds a processing instruction (<?${pi.target} …?>) that could pull in other files.`));
  });
  parser.on("opentag", (tag: SaxesTagNS) => {
    if (problem) return;
    elements++;
    if (elements > LOGO_LIMITS.elements)
      return refuse(
        new LogoError("svg_too_complex", `The drawing has more than ${LOGO_LIMITS.elements} elements. Simplify it or merge shapes.`),
      );
    const parent = stack[stack.length - 1];
    const name = tag.local;
    const attrs: Record<string, string> = {};
    for (const a of Object.values(tag.attributes)) {
      const local = a.local;
      if (/^on/i.test(local))
        return refuse(
          new LogoError("svg_script", `The drawing has an event handler (${a.name}), which is script. Export it again without scripts.`),
        );
      if (local === "href" && !a.value.startsWith("#") && !a.value.startsWith("data:"))
        return refuse(
          new LogoError(
            "svg_external",
            `The drawing refers to another file or address (${a.value.slice(0, 60)}). Logos must hold every shape themselves.`,
          ),
        );
      if (/url\(\s*['"]?(?!#)/i.test(a.value))
        return refuse(
          new LogoError(
            "svg_external",
            `The drawing refers to another file or address in ${a.name}. Logos must hold every shape themselves.`,
          ),
        );
      attrs[local] = a.value;
    }
    if (!sawRoot) {
      sawRoot = true;
      if (name !== "svg") return refuse(new LogoError("svg_invalid", "This is not an SVG drawing (its first element is not <svg>)."));
    }
    const skip = Boolean(parent?.skip) || SKIPPED.has(name) || name === "defs";
    const refused = REFUSED[name];
    if (refused && !(parent?.skip && name !== "script")) return refuse(new LogoError(refused[0], refused[1]));
    if (!skip && !SHAPES.has(name) && !CONTAINERS.has(name)) {
      return refuse(
        new LogoError(
          "svg_not_geometry",
          `<${name}> is not geometry a slab can carry. Logos may hold paths, rect, circle, ellipse, polygon and polyline in groups; ` +
            `remove or flatten the rest.`,
        ),
      );
    }
    // Presentation attributes, and the same properties in a style="" attribute, inherit from groups.
    const style = Object.fromEntries(
      (attrs.style ?? "")
        .split(";")
        .map((d) => d.split(":").map((s) => s.trim()))
        .filter((p) => p.length === 2 && p[0]) as [string, string][],
    );
    const fill = style.fill ?? attrs.fill ?? parent?.fill;
    const fillRule = style["fill-rule"] ?? attrs["fill-rule"] ?? parent?.fillRule;
    const stroke = style.stroke ?? attrs.stroke ?? parent?.stroke;
    const transform = `${parent?.transform ?? ""} ${attrs.transform ?? ""}`.trim();
    stack.push({ name, transform, fill, fillRule, stroke, skip });
    if (skip || !SHAPES.has(name)) return;
    if (name === "line" || fill === "none" || fill === "transparent") {
      if (stroke && stroke !== "none") strokeOnly++;
      return;
    }
    try {
      const d = shapeToPath(name, attrs);
      if (!d) return;
      chars += d.length;
      if (chars > LOGO_LIMITS.pathChars || paths.length >= LOGO_LIMITS.paths)
        return refuse(
          new LogoError(
            "svg_too_complex",
            `The drawing's outlines are too detailed (over ${LOGO_LIMITS.paths} shapes or ` +
              `${LOGO_LIMITS.pathChars.toLocaleString("en-US")} characters of path data). Simplify it.`,
          ),
        );
      // Into the root's user units, arcs as cubic curves, y up (the slab's axes).
      const abs = svgpath(d).transform(transform).abs().unshort().unarc().scale(1, -1).round(4).toString();
      paths.push({ d: abs, fillRule: fillRule === "evenodd" ? "evenodd" : "nonzero" });
    } catch (err) {
      if (err instanceof LogoError) return refuse(err);
      return refuse(new LogoError("svg_invalid", `A <${name}> could not be read: ${err instanceof Error ? err.message : String(err)}.`));
    }
  });
  parser.on("closetag", () => {
    stack.pop();
  });
  parser.on("error", (e) => refuse(new LogoError("svg_invalid", `The file is not well-formed SVG: ${e.message.split("\n")[0]}`)));
  try {
    parser.write(text).close();
  } catch (e) {
    refuse(new LogoError("svg_invalid", `The file is not well-formed SVG: ${e instanceof Error ? e.message.split("\n")[0] : String(e)}`));
  }
  if (problem) throw problem;
  if (!sawRoot) throw new LogoError("svg_invalid", "The file is empty or not SVG.");
  if (paths.length === 0) {
    if (strokeOnly)
      throw new LogoError(
        "svg_stroke_only",
        'The drawing has only strokes (lines without a fill). Convert the strokes to outlines ("stroke to path") and export again.',
      );
    throw new LogoError("svg_empty", "The drawing has no filled shapes to engrave.");
  }
  let minX = Infinity,
    minY = Infinity,
    maxX = -Infinity,
    maxY = -Infinity;
  for (const p of paths) {
    for (const c of toCommands(p.d)) {
      for (const [x, y] of cmdPoints(c)) {
        if (x < minX) minX = x;
        if (x > maxX) maxX = x;
        if (y < minY) minY = y;
        if (y > maxY) maxY = y;
      }
    }
  }
  if (!(maxX - minX > 0 && maxY - minY > 0)) throw new LogoError("svg_empty", "The drawing's shapes have no area.");
  const box = { minX, minY, maxX, maxY };
  // Refuse what would flatten into too many points at the largest logo size.
  const pts = logoContours({ paths, box }, 200).reduce((s, x) => s + x.contours.reduce((t, c) => t + c.length, 0), 0);
  if (pts > LOGO_LIMITS.points)
    throw new LogoError(
      "svg_too_complex",
      `The drawing flattens to ${pts.toLocaleString("en-US")} points; a logo may have at most ` +
        `${LOGO_LIMITS.points.toLocaleString("en-US")}. Simplify its curves.`,
    );
  return { paths, box };
}

function toCommands(d: string): PathCommand[] {
  const out: PathCommand[] = [];
  let x = 0,
    y = 0;
  svgpath(d).iterate((seg) => {
    const [t, ...v] = seg as [string, ...number[]];
    switch (t) {
      case "M":
        out.push({ type: "M", x: (x = v[0]!), y: (y = v[1]!) });
        break;
      case "L":
        out.push({ type: "L", x: (x = v[0]!), y: (y = v[1]!) });
        break;
      case "H":
        out.push({ type: "L", x: (x = v[0]!), y });
        break;
      case "V":
        out.push({ type: "L", x, y: (y = v[0]!) });
        break;
      case "C":
        out.push({ type: "C", x1: v[0]!, y1: v[1]!, x2: v[2]!, y2: v[3]!, x: (x = v[4]!), y: (y = v[5]!) });
        break;
      case "Q":
        out.push({ type: "Q", x1: v[0]!, y1: v[1]!, x: (x = v[2]!), y: (y = v[3]!) });
        break;
      case "Z":
      case "z":
        out.push({ type: "Z" });
        break;
    }
  });
  return out;
}

function cmdPoints(c: PathCommand): [number, number][] {
  if (c.type === "Z") return [];
  if (c.type === "C")
    return [
      [c.x1, c.y1],
      [c.x2, c.y2],
      [c.x, c.y],
    ];
  if (c.type === "Q")
    return [
      [c.x1, c.y1],
      [c.x, c.y],
    ];
  return [[c.x, c.y]];
}

/**
 * The logo's outlines in millimetres at `width` mm wide, from (0, 0), flattened to the text chord
 * tolerance; one contour set per path with its fill rule (the kernel unions them).
 */
export function logoContours(
  logo: Pick<LogoMark, "paths" | "box">,
  width: number,
  tolerance = TEXT_TOLERANCE,
): { contours: Contour[]; fillRule: "nonzero" | "evenodd" }[] {
  const scale = width / (logo.box.maxX - logo.box.minX);
  return logo.paths.map((p) => {
    const contours: Contour[] = [];
    // flattenPath works in the path's units and scales at the end; move the box's corner to 0 first.
    const cmds = toCommands(p.d).map((c) => shift(c, -logo.box.minX, -logo.box.minY));
    flattenPath(cmds, 0, tolerance / scale, contours, scale);
    return { contours, fillRule: p.fillRule };
  });
}

function shift(c: PathCommand, dx: number, dy: number): PathCommand {
  switch (c.type) {
    case "Z":
      return c;
    case "C":
      return { type: "C", x1: c.x1 + dx, y1: c.y1 + dy, x2: c.x2 + dx, y2: c.y2 + dy, x: c.x + dx, y: c.y + dy };
    case "Q":
      return { type: "Q", x1: c.x1 + dx, y1: c.y1 + dy, x: c.x + dx, y: c.y + dy };
    default:
      return { type: c.type, x: c.x + dx, y: c.y + dy };
  }
}

/** The logo's height at `width` mm wide. */
export function logoHeight(logo: Pick<LogoMark, "box">, width: number): number {
  return (width * (logo.box.maxY - logo.box.minY)) / (logo.box.maxX - logo.box.minX);
}
