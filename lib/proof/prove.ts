import polygonClipping, { type MultiPolygon, type Ring } from "polygon-clipping";
import { deepestEngraving, floorUnderMarks, type SlabOptions } from "@/lib/geometry/options";
import {
  boundaryLoops,
  boxesOverlap,
  convexHull,
  ConvexShape,
  halfPlanes,
  isConvex,
  multiArea,
  multiPerimeter,
  TriGrid,
  withinPlanes,
  type Box2,
} from "./planar";
import { decodeRaster, heightRaster } from "./qr-read";
import { readWeldedStl, StlProofError, type WeldedStl } from "./stl";
import {
  readThreeMfBodies,
  readThreeMfBodiesAsync,
  ThreeMfProofError,
  type InflateRaw,
  type InflateRawAsync,
  type ThreeMfRead,
} from "./three-mf";
import { connectedBodies, edgeReport, hollows, type Body, type EdgeReport } from "./topology";

/**
 * The proof of a plate: an independent reading of the exported STL and 3MF bytes (no geometry kernel,
 * nothing of the engine but its option types) that says whether the files print as designed.
 */
export type ProofRuleId = "stl" | "closed" | "oriented" | "volume" | "bodies" | "on_slab" | "apart" | "gap" | "floor" | "qr" | "three_mf";
export type ProofRule = { rule: ProofRuleId; pass: boolean; figure?: number | string; message: string };
export type ProofFigures = {
  bodies: number;
  openEdges: number;
  minFloor: number | null;
  worstSupport: number | null;
  qrText: string | null;
};
export type Proof = {
  ok: boolean;
  failed?: ProofRuleId;
  rules: ProofRule[];
  figures: ProofFigures;
  ms: number;
  summary: string;
  timings: Record<string, number>;
};

export type ProofInput = {
  stl: Uint8Array;
  threeMf: Uint8Array;
  /** What was asked: the parsed options (thickness, gap, layer height, marks). */
  options: Pick<SlabOptions, "slab" | "layerHeight" | "marks">;
  /** How many pieces were asked for. */
  pieces: number;
  /** The QR value asked for, its placeholders filled (see `fillValue`); needed when the options ask for a QR code. */
  qrValue?: string;
  /** The layout's marks: where the QR code was put, so only that area is drawn. Without it the whole slab is. */
  marks?: { kind: string; bounds: Box2 }[];
  /** A faster raw DEFLATE decoder for the 3MF (node:zlib's inflateRawSync in the worker); fflate's by default. */
  inflateRaw?: InflateRaw;
  /** For provePlateAsync: a decoder off this thread for the 3MF's model part (node:zlib's inflateRaw). */
  inflateRawAsync?: InflateRawAsync;
  /**
   * For provePlateAsync: the whole 3MF read (readThreeMfBodies) on another thread, e.g. the worker's
   * reader thread (lib/jobs/three-mf-reader.ts), so the STL and the 3MF are checked at once.
   * Preferred to `inflateRawAsync`; rejects with ThreeMfProofError where the package does not read.
   */
  readThreeMf?: (bytes: Uint8Array) => Promise<ThreeMfRead>;
  /** For provePlateAsync: the welded STL's edges counted (edgeReport) on another thread, while the other STL rules run here. */
  countEdges?: (mesh: WeldedStl) => Promise<EdgeReport>;
  /** The layout's pieces, to name a piece by its number in a message. */
  labels?: { number: number; bounds: Box2 }[];
  /**
   * How many closed shells each piece is, in the layout's order (as `labels`): more than 1 for a part
   * of several bodies, or a hollow part (an outer shell and an inside-out inner one). 1 each when not
   * given. With `labels`, a piece's loose bodies are told apart from the other pieces by its bounds.
   */
  shells?: number[];
};

/** `{name}` placeholders filled from `vars` (unknown ones stay as written), as the plate's marks are. */
export function fillValue(value: string, vars: Record<string, string>): string {
  return value.replace(/\{([a-z][a-z0-9_]*)\}/gi, (whole, name: string) => vars[name.toLowerCase()] ?? whole);
}

const fmt = (x: number, d = 2) => (Math.abs(x) < 0.5 * 10 ** -d ? 0 : x).toFixed(d);
const at = (x: number, y: number) => `x ${fmt(x, 1)}, y ${fmt(y, 1)} mm`;

type Piece = {
  body: Body;
  /** The piece the body belongs to: an index into `labels`, or its own (negative) when none fits. */
  group: number;
  label: string;
  base: number;
  box: Box2;
  hull: Float64Array;
  convex: ConvexShape;
  up: Uint32Array;
  down: Uint32Array;
  grid?: TriGrid;
  /** The bottom facets (flat, at the base) as 2D triangles, on their own grid. */
  bottom?: TriGrid | null;
};

/** The proof, the 3MF read on this thread. */
export function provePlate(input: ProofInput): Proof {
  const steps = proofSteps(input, performance.now(), () => {});
  let r = steps.next();
  while (!r.done) r = steps.next(r.value.ask === "edges" ? edgeReport(r.value.mesh) : readNow(input));
  return r.value;
}

/**
 * The same proof, the 3MF read while the STL is checked on this thread: wholly on another thread by
 * `input.readThreeMf` (the worker's reader thread), or its model part expanded by
 * `input.inflateRawAsync` (node:zlib's thread pool) and read here after the STL; without either, as
 * provePlate.
 */
export async function provePlateAsync(input: ProofInput): Promise<Proof> {
  const t0 = performance.now();
  // A second thread that fails (it died, it could not start) costs time, not the proof: its work is
  // then done here. Only the 3MF's own faults (ThreeMfProofError) come back as the 3MF's answer.
  const pending: Promise<ThreeMfRead | ThreeMfProofError> | null = input.readThreeMf
    ? input.readThreeMf(input.threeMf).catch((err: unknown) => (err instanceof ThreeMfProofError ? err : readNow(input)))
    : input.inflateRawAsync
      ? readThreeMfBodiesAsync(input.threeMf, input.inflateRawAsync, input.inflateRaw).catch((err: unknown) => {
          if (err instanceof ThreeMfProofError) return err;
          throw err;
        })
      : null;
  // Not asked for when the STL does not read: no rejection goes unheard.
  pending?.catch(() => {});
  let edges: Promise<EdgeReport> | null = null;
  const steps = proofSteps(input, t0, (m) => {
    edges = input.countEdges?.(m).catch(() => edgeReport(m)) ?? null;
  });
  let r = steps.next();
  while (!r.done) {
    const a = r.value;
    r = steps.next(a.ask === "edges" ? ((await edges) ?? edgeReport(a.mesh)) : pending ? await pending : readNow(input));
  }
  return r.value;
}

function readNow(input: ProofInput): ThreeMfRead | ThreeMfProofError {
  try {
    return readThreeMfBodies(input.threeMf, input.inflateRaw);
  } catch (err) {
    if (err instanceof ThreeMfProofError) return err;
    throw err;
  }
}

/**
 * What the rules ask their driver for: the edge count of the welded STL, started as soon as the STL
 * is welded (`start`) and wanted when the rest of the STL's rules are done (`edges`); the 3MF's
 * reading when its rule comes (`3mf`).
 */
type Ask = { ask: "edges"; mesh: WeldedStl } | { ask: "3mf" };
type Answer = EdgeReport | ThreeMfRead | ThreeMfProofError | undefined;

/** The rules in order; the edge count and the 3MF's reading are asked for (yield) when they are wanted. */
function* proofSteps(input: ProofInput, t0: number, startEdges: (m: WeldedStl) => void): Generator<Ask, Proof, Answer> {
  let welded: WeldedStl | null = null;
  // The STL's rules in a plain function: V8 optimizes a long loop in the middle of a plain function
  // (on-stack replacement), not one in a generator's body.
  const s = stlRules(input, t0, (m) => {
    welded = m;
    startEdges(m);
  });
  if ("proof" in s) return s.proof;
  edgeRules((yield { ask: "edges", mesh: welded! }) as EdgeReport, s.rules, s.figures);
  s.lap("edges");
  const read = (yield { ask: "3mf" }) as ThreeMfRead | ThreeMfProofError;
  return threeMfRule(read, s.bodies, s.rules, s.done);
}

type StlDone =
  { proof: Proof } | { bodies: Body[]; rules: ProofRule[]; figures: ProofFigures; lap: (name: string) => void; done: () => Proof };

function stlRules(input: ProofInput, t0: number, startEdges: (m: WeldedStl) => void): StlDone {
  const timings: Record<string, number> = {};
  let tl = t0;
  const lap = (name: string) => {
    const now = performance.now();
    timings[name] = Math.round((now - tl) * 10) / 10;
    tl = now;
  };
  const rules: ProofRule[] = [];
  const figures: ProofFigures = { bodies: 0, openEdges: 0, minFloor: null, worstSupport: null, qrText: null };
  const o = input.options;
  const layer = o.layerHeight;
  const thickness = o.slab.thickness;
  const gap = o.slab.gap;
  // A small fraction of a layer: far above float32 rounding at plate sizes, far below anything a slicer sees.
  const tol = Math.max(0.002, 0.05 * layer);
  const done = (): Proof => {
    const failed = rules.find((r) => !r.pass);
    const ms = Math.round((performance.now() - t0) * 10) / 10;
    const summary = failed
      ? `Not proven: ${failed.message}`
      : `Checked: closed, ${figures.bodies} bodies, every piece on the slab${figures.qrText !== null ? ", QR reads back" : ""}, 3MF ` +
        `matches`;
    lap("3mf");
    return { ok: !failed, ...(failed ? { failed: failed.rule } : {}), rules, figures, ms, summary, timings };
  };

  let m: WeldedStl;
  try {
    m = readWeldedStl(input.stl);
  } catch (err) {
    if (!(err instanceof StlProofError)) throw err;
    rules.push({ rule: "stl", pass: false, message: err.message });
    return { proof: done() };
  }
  rules.push({
    rule: "stl",
    pass: true,
    figure: m.triangles,
    message: `${m.triangles.toLocaleString("en-US")} triangles, ${m.positions.length / 3} corners after welding.`,
  });

  lap("read");
  // 1. Closed and oriented (edgeRules, below), counted while the rest goes on: on another thread
  // where the caller has one, and put in its place among the rules when it is in.
  startEdges(m);
  // 2. Bodies: positive volume each; the slab is the one body standing on z = 0; the rest are the pieces.
  const facing = new Int8Array(m.triangles);
  const bodies = connectedBodies(m, facing);
  figures.bodies = bodies.length;
  // A hollow part's inner wall is inside out, as it should be, when it lies within a positive body.
  const inner = hollows(m, bodies);
  const inverted = bodies.filter((b) => b.volume <= 0 && !inner.has(b));
  rules.push(
    inverted.length === 0
      ? {
          rule: "volume",
          pass: true,
          message: inner.size
            ? `Every body has a positive volume, but for ${inner.size} inside-out ${inner.size === 1 ? "shell" : "shells"} each ` +
              `inside one (a hollow).`
            : "Every body has a positive volume.",
        }
      : {
          rule: "volume",
          pass: false,
          figure: inverted[0]!.volume,
          message:
            `${inverted.length} bodies have no positive volume (inside out or flat), the first at ` +
            `${at(...centre(inverted[0]!))}: ${fmt(inverted[0]!.volume, 3)} mm³.`,
        },
  );
  const onBed = bodies.filter((b) => Math.abs(b.min[2]) <= tol);
  const below = bodies.filter((b) => b.min[2] < -tol);
  const slab = onBed.reduce<Body | null>((best, b) => (!best || b.volume > best.volume ? b : best), null);
  const labels = input.labels ?? [];
  const shellsOf = (i: number) => {
    const s = input.shells?.[i];
    return s !== undefined && Number.isInteger(s) && s >= 1 ? s : 1;
  };
  let shellTotal = 0;
  for (let i = 0; i < input.pieces; i++) shellTotal += shellsOf(i);
  const want = shellTotal + 1;
  // Each outer body's piece (hollows go with the body around them).
  const outerBodies = bodies.filter((b) => b !== slab && !inner.has(b));
  const groupOf = pieceGroups(outerBodies, labels, shellsOf);
  {
    const problems: string[] = [];
    if (bodies.length !== want)
      problems.push(
        shellTotal === input.pieces
          ? `${bodies.length} bodies where ${input.pieces} pieces and the slab make ${want}`
          : `${bodies.length} bodies where ${input.pieces} pieces of ${shellTotal} shells and the slab make ${want}`,
      );
    if (onBed.length === 0) problems.push("no body stands on z = 0 (no slab)");
    if (onBed.length > 1)
      problems.push(
        `the slab is in ${onBed.length} loose parts on z = 0 (the smallest at ` +
          `${at(...centre(onBed.reduce((a, b) => (b.volume < a.volume ? b : a))))})`,
      );
    if (below.length)
      problems.push(`${below.length} bodies reach below the bed (lowest z ${fmt(Math.min(...below.map((b) => b.min[2])))} mm)`);
    if (input.shells && labels.length) {
      // Shell for shell, piece by piece: the outer bodies each piece was given, and the hollows inside them.
      const count = new Uint32Array(labels.length);
      for (const b of outerBodies) if (groupOf.get(b)! >= 0) count[groupOf.get(b)!]!++;
      for (const [, around] of inner) if ((groupOf.get(around) ?? -1) >= 0) count[groupOf.get(around)!]!++;
      const off = labels.map((l, i) => ({ l, i })).filter(({ i }) => i < input.pieces && count[i] !== shellsOf(i));
      if (off.length)
        problems.push(
          `piece ${off[0]!.l.number} has ${count[off[0]!.i]} shells where its part has ` +
            `${shellsOf(off[0]!.i)}${off.length > 1 ? ` (${off.length} pieces differ)` : ""}`,
        );
    }
    const what =
      shellTotal === input.pieces ? `the slab and ${input.pieces} pieces` : `the slab and ${input.pieces} pieces of ${shellTotal} shells`;
    rules.push(
      problems.length
        ? { rule: "bodies", pass: false, figure: bodies.length, message: `${cap(problems.join("; "))}.` }
        : { rule: "bodies", pass: true, figure: bodies.length, message: `${bodies.length} bodies: ${what}.` },
    );
  }
  if (!slab) {
    rules.push({ rule: "on_slab", pass: false, message: "There is no slab for the pieces to stand on." });
    return { bodies, rules, figures, lap, done };
  }

  lap("bodies");
  const P = m.positions,
    T = m.tris;
  const zOf = (v: number) => P[3 * v + 2]!;
  const corners = (t: number): [number, number, number] => [T[3 * t]!, T[3 * t + 1]!, T[3 * t + 2]!];
  const tri2d = (t: number) => {
    const a = 3 * T[3 * t]!,
      b = 3 * T[3 * t + 1]!,
      c = 3 * T[3 * t + 2]!;
    return Float64Array.of(P[a]!, P[a + 1]!, P[b]!, P[b + 1]!, P[c]!, P[c + 1]!);
  };
  const split = (tris: Uint32Array) => splitFacing(tris, facing);

  // The slab seen from above: the boundary of its bottom face (at z = 0), read even-odd.
  const slabFaces = split(slab.tris);
  const bottom = Array.from(slabFaces.down).filter((t) => zOf(T[3 * t]!) <= tol && zOf(T[3 * t + 1]!) <= tol && zOf(T[3 * t + 2]!) <= tol);
  const loops = boundaryLoops(bottom, P, corners);
  const outline: MultiPolygon = loops.length ? xorRings(loops) : [];
  const holes = outline.reduce((s, poly) => s + poly.length - 1, 0);
  const outer = outline.length === 1 && holes === 0 ? outline[0]![0]! : null;
  const planes = outer !== null && isConvex(outer) ? halfPlanes(outer) : null;

  lap("slab outline");
  const scratch = new Float64Array(2 * outerBodies.reduce((most, b) => Math.max(most, b.verts.length), 0));
  const pieces: Piece[] = outerBodies.map((body) => {
    const { up, down } = split(body.tris);
    const hull = convexHull(shadowPoints(body.verts, P, scratch));
    const group = groupOf.get(body)!;
    return {
      body,
      group,
      label: labelOf(labels, group, body),
      base: body.min[2],
      box: { minX: body.min[0], minY: body.min[1], maxX: body.max[0], maxY: body.max[1] },
      hull,
      convex: new ConvexShape(hull),
      up,
      down,
    };
  });
  lap("pieces");
  const shadowGrid = (p: Piece) => (p.grid ??= new TriGrid(flat(p.up, P, T)));

  // 3. Every piece on the slab: its lowest layer (down-facing triangles within one layer of its base)
  // inside the slab's outline.
  let worst = 100;
  let worstPiece: { p: Piece; pct: number; out: number } | null = null;
  for (const p of pieces) {
    const top = p.base + layer;
    const flatBottom = flatAt(p.down, p.base + tol, P, T);
    const nb = flatBottom.length;
    p.bottom = nb ? new TriGrid(flat(flatBottom, P, T)) : null;
    let pct = 100,
      out = 0;
    // A piece whose whole outline (its hull) lies inside a convex slab has its lowest layer on it too.
    if (planes && withinPlanes(planes, p.hull, tol)) {
      // on the slab
    } else {
      // The lowest layer: the flat bottom, and the down-facing triangles that reach below one layer up, clipped there.
      const band: Ring[] = [];
      for (const t of p.down) {
        const [a, b, c] = corners(t);
        const za = zOf(a),
          zb = zOf(b),
          zc = zOf(c);
        if (Math.max(za, zb, zc) > p.base + tol && Math.min(za, zb, zc) < top)
          band.push(
            clipBelow(
              [a, b, c].map((v) => [P[3 * v]!, P[3 * v + 1]!, zOf(v)] as [number, number, number]),
              top,
            ),
          );
      }
      const loopsPart = boundaryLoops(flatBottom, P, corners);
      let fp: MultiPolygon = loopsPart.length ? xorRings(loopsPart) : [];
      const bandPolys = band.filter((r) => r.length >= 3).map((r) => [r]);
      if (bandPolys.length) fp = polygonClipping.union(fp, ...bandPolys);
      const total = multiArea(fp);
      const inside = outline.length && total > 0 ? multiArea(polygonClipping.intersection(fp, outline)) : 0;
      pct = total > 0 ? (100 * inside) / total : 0;
      // Allowed outside: a band of the tolerance along the footprint's edge.
      if (total - inside <= tol * multiPerimeter(fp)) pct = 100;
      out = total - inside;
    }
    if (pct < worst || (!worstPiece && pct <= worst)) worstPiece = { p, pct, out };
    worst = Math.min(worst, pct);
  }
  figures.worstSupport = pieces.length ? Math.round(worst * 100) / 100 : null;
  rules.push(
    worst >= 100
      ? {
          rule: "on_slab",
          pass: true,
          figure: worst,
          message:
            `Every piece's lowest layer lies on the slab ` +
            `(${pieces.length === input.pieces ? `${pieces.length} pieces` : `${input.pieces} pieces, ${pieces.length} bodies`}).`,
        }
      : {
          rule: "on_slab",
          pass: false,
          figure: figures.worstSupport ?? 0,
          message:
            `${cap(worstPiece!.p.label)} stands ${fmt(100 - worst, 1)} % off the slab: only ${fmt(worst, 1)} % of its lowest ` +
            `layer is over the slab's outline.`,
        },
  );

  lap("on_slab");
  // 4. Pieces apart: no two pieces overlap seen from above (they all share the same heights).
  let clash: string | null = null;
  for (let i = 0; i < pieces.length && !clash; i++) {
    for (let j = i + 1; j < pieces.length && !clash; j++) {
      const a = pieces[i]!,
        b = pieces[j]!;
      if (a.group === b.group) continue; // one part's own bodies
      if (a.body.max[2] <= b.base || b.body.max[2] <= a.base) continue;
      if (!boxesOverlap(a.box, b.box, 1e-3) || !b.convex.overlaps(a.hull, 1e-3)) continue;
      const g = shadowGrid(a);
      for (const t of b.up) {
        const tri = tri2d(t);
        if (g.overlaps(tri, 1e-3)) {
          clash = `${cap(a.label)} and ${b.label} overlap seen from above (near ${at(tri[0]!, tri[1]!)}).`;
          break;
        }
      }
    }
  }
  rules.push(clash ? { rule: "apart", pass: false, message: clash } : { rule: "apart", pass: true, message: "No two pieces overlap." });

  lap("apart");
  // 5. The gap: the highest slab surface under each piece's shadow lies exactly `gap` below its base
  // (so nothing of the slab, an embossed mark included, rises into or under a piece).
  const top = slabTop(slabFaces.up, P, T);
  const slabUp = top.tris;
  const pocket = o.marks.outlines === "pocket";
  let gapProblem: string | null = null;
  let worstGap = gap;
  for (const p of pieces) {
    // The highest slab face under the piece: above the asked surface anything under its shadow counts
    // (an embossed mark under an overhang); at or below it, what lies under its bottom facets.
    const under = highestUnder(p, top, p.base - gap + tol, p.base - gap - 2, shadowGrid);
    if (under === null) {
      gapProblem ??= `${cap(p.label)} has no slab under it.`;
      continue;
    }
    const g = p.base - under;
    if (Math.abs(g - gap) > Math.abs(worstGap - gap)) worstGap = g;
    if (g < -tol)
      gapProblem ??=
        `${cap(p.label)} sits ${fmt(-g)} mm into the slab (its base at z ${fmt(p.base)} mm, the slab under it reaches z ` +
        `${fmt(under)} mm).`;
    else if (g < gap - tol)
      gapProblem ??=
        `${cap(p.label)} is only ${fmt(g)} mm above the slab where ${fmt(gap)} mm was asked: the slab rises to z ` +
        `${fmt(under)} mm under it.`;
    else if (g > gap + tol)
      gapProblem ??= `${cap(p.label)} floats ${fmt(g)} mm above the slab where ${fmt(gap)} mm was asked (its base at z ${fmt(p.base)} mm).`;
    else if (!pocket && Math.abs(p.base - (thickness + gap)) > tol)
      gapProblem ??=
        `${cap(p.label)} stands at z ${fmt(p.base)} mm, not on the slab's top at ${fmt(thickness + gap)} mm ` +
        `(${fmt(thickness)} mm slab + ${fmt(gap)} mm gap).`;
  }
  rules.push(
    gapProblem
      ? { rule: "gap", pass: false, figure: Math.round(worstGap * 1000) / 1000, message: gapProblem }
      : { rule: "gap", pass: true, figure: gap, message: `Every piece floats ${fmt(gap)} mm above the slab.` },
  );

  lap("gap");
  // 6. Floors: the lowest upward-facing surface of the slab, and no hole through it.
  const need = floorUnderMarks(o);
  const lowest = lowestFlat(slabUp, tol, P, T);
  let minFloor = lowest.z;
  const floorAt = lowest.at;
  if (holes > 0) minFloor = 0;
  figures.minFloor = Number.isFinite(minFloor) ? Math.round(minFloor * 1000) / 1000 : null;
  rules.push(
    minFloor >= need - 1e-4
      ? {
          rule: "floor",
          pass: true,
          figure: figures.minFloor ?? 0,
          message: `The thinnest floor under a mark is ${fmt(minFloor)} mm (at least ${fmt(need)} mm).`,
        }
      : {
          rule: "floor",
          pass: false,
          figure: figures.minFloor ?? 0,
          message:
            holes > 0
              ? `A mark cuts right through the slab (${holes} holes in its bottom face); at least ${fmt(need)} mm must stay under ` +
                `every mark.`
              : `The floor under a mark is ${fmt(minFloor)} mm at ${at(...floorAt)}: ${fmt(need - minFloor)} mm short of the ` +
                `${fmt(need)} mm (2 layers of ${fmt(layer)} mm, never under 0.40 mm) that must stay.`,
        },
  );

  lap("floor");
  // 7. The QR code reads back from a top view of the slab, exactly as asked.
  const qr = o.marks.qr;
  if (qr) {
    const box = input.marks?.find((k) => k.kind === "qr")?.bounds;
    const margin = qr.module;
    const region = box
      ? { minX: box.minX - margin, minY: box.minY - margin, maxX: box.maxX + margin, maxY: box.maxY + margin }
      : { minX: slab.min[0], minY: slab.min[1], maxX: slab.max[0], maxY: slab.max[1] };
    // Six pixels a module: enough for jsQR's sampling grid, small enough to stay cheap.
    const ppm = Math.min(25, Math.max(3, 6 / qr.module));
    const raster = heightRaster(P, T, slabUp, region, ppm);
    // "As deep as allowed": the slab less the floor every engraving keeps (the option's own rule).
    const depth = qr.depth === "max" ? deepestEngraving(o) : qr.depth;
    const dark =
      qr.relief === "engrave" ? (z: number) => z > -Infinity && z < thickness - depth / 2 : (z: number) => z > thickness + depth / 2;
    const text = decodeRaster(raster, dark);
    figures.qrText = text;
    const asked = input.qrValue;
    rules.push(
      asked !== undefined && text === asked
        ? { rule: "qr", pass: true, figure: text, message: `The QR code reads back "${short(text)}".` }
        : {
            rule: "qr",
            pass: false,
            figure: text ?? "",
            message:
              text === null
                ? `The QR code does not decode from a top view of the slab (${raster.width} × ${raster.height} px at ${fmt(ppm, 1)} px/mm).`
                : `The QR code reads "${short(text)}", not "${short(asked ?? "")}" as asked.`,
          },
    );
    if (text !== asked) figures.qrText = text;
  }
  lap("qr");
  return { bodies, rules, figures, lap, done };
}

/** 1. Closed and oriented: every undirected edge in exactly two triangles, each directed edge once. Second among the rules. */
function edgeRules(e: EdgeReport, rules: ProofRule[], figures: ProofFigures): void {
  const found: ProofRule[] = [];
  figures.openEdges = e.open + e.nonManifold;
  const where = e.firstBad ? ` (first at ${at(e.firstBad.at[0], e.firstBad.at[1])}, z ${fmt(e.firstBad.at[2])} mm)` : "";
  found.push(
    e.open + e.nonManifold + e.degenerate === 0
      ? {
          rule: "closed",
          pass: true,
          figure: 0,
          message: `All ${e.edges.toLocaleString("en-US")} edges are shared by exactly two triangles.`,
        }
      : {
          rule: "closed",
          pass: false,
          figure: e.open + e.nonManifold,
          message:
            `The STL is not closed: ${e.open} open edges, ${e.nonManifold} edges in more than two ` +
            `triangles${e.degenerate ? `, ${e.degenerate} triangles with a repeated corner` : ""}${where}.`,
        },
  );
  found.push(
    e.misoriented === 0
      ? { rule: "oriented", pass: true, figure: 0, message: "Every edge is used once in each direction." }
      : {
          rule: "oriented",
          pass: false,
          figure: e.misoriented,
          message:
            `${e.misoriented} edges run the same way in both their triangles: a triangle is turned ` +
            `over${e.firstBad?.kind === "misoriented" ? where : ""}.`,
        },
  );

  rules.splice(1, 0, ...found);
}

/** 8. The 3MF read back holds the same bodies, shell for shell: count, triangles, bounds within 1e-3 mm, volume. */
function threeMfRule(read: ThreeMfRead | ThreeMfProofError, bodies: Body[], rules: ProofRule[], done: () => Proof): Proof {
  if (read instanceof ThreeMfProofError) {
    rules.push({ rule: "three_mf", pass: false, message: read.message });
    return done();
  }
  if (read.problems.length) {
    rules.push({ rule: "three_mf", pass: false, message: `The 3MF does not read cleanly: ${read.problems.slice(0, 3).join(" ")}` });
    return done();
  }
  // Shell for shell: the 3MF's meshes split where their triangles share no vertex, as the STL's bodies are.
  const shells = read.shells;
  if (shells.length !== bodies.length) {
    rules.push({
      rule: "three_mf",
      pass: false,
      figure: shells.length,
      message: `The 3MF holds ${shells.length} bodies, the STL ${bodies.length}.`,
    });
    return done();
  }
  const byCount = new Map<number, typeof shells>();
  for (const b of shells) byCount.set(b.triangles, [...(byCount.get(b.triangles) ?? []), b]);
  const close = (a: number[], b: number[]) => a.every((x, i) => Math.abs(x - b[i]!) <= 1e-3);
  for (const b of bodies) {
    const list = byCount.get(b.tris.length) ?? [];
    // Corners 1e-3 mm apart (what the bounds allow) move a closed surface's volume by at most
    // √3·1e-3 mm × its area: the volume's first variation is the normal displacement over the surface.
    const i = list.findIndex((x) => close(x.min, b.min) && close(x.max, b.max) && Math.abs(x.volume - b.volume) <= 2e-3 * b.area + 1e-9);
    if (i < 0) {
      rules.push({
        rule: "three_mf",
        pass: false,
        message:
          `No 3MF body matches the STL body at ${at(...centre(b))} (${b.tris.length} triangles, ${fmt(b.max[0] - b.min[0])} × ` +
          `${fmt(b.max[1] - b.min[1])} × ${fmt(b.max[2] - b.min[2])} mm, ${fmt(b.volume, 1)} mm³).`,
      });
      return done();
    }
    list.splice(i, 1);
  }
  rules.push({
    rule: "three_mf",
    pass: true,
    figure: shells.length,
    message: `The 3MF holds the same ${shells.length} bodies (triangles, bounds and volume).`,
  });
  return done();
}

/** Closed loops read even-odd (each loop an outline or a hole), as one region. */
function xorRings(loops: Ring[]): MultiPolygon {
  const [first, ...rest] = loops.map((l) => [l]);
  return first ? polygonClipping.xor(first, ...rest) : [];
}

/** The part of a triangle (x, y, z corners) at or below z = `top`, seen from above. */
function clipBelow(tri: [number, number, number][], top: number): Ring {
  const out: Ring = [];
  for (let i = 0; i < 3; i++) {
    const a = tri[i]!,
      b = tri[(i + 1) % 3]!;
    const ina = a[2] <= top,
      inb = b[2] <= top;
    if (ina) out.push([a[0], a[1]]);
    if (ina !== inb) {
      const s = (top - a[2]) / (b[2] - a[2]);
      out.push([a[0] + s * (b[0] - a[0]), a[1] + s * (b[1] - a[1])]);
    }
  }
  return out;
}

/** Triangles seen from above: x, y of their three corners, six numbers each. */
function flat(tris: Uint32Array, P: Float32Array, T: Uint32Array): Float64Array {
  const out = new Float64Array(tris.length * 6);
  for (let i = 0; i < tris.length; i++) {
    const t = tris[i]!;
    for (let c = 0; c < 3; c++) {
      const v = 3 * T[3 * t + c]!;
      out[6 * i + 2 * c] = P[v]!;
      out[6 * i + 2 * c + 1] = P[v + 1]!;
    }
  }
  return out;
}

const centre = (b: Body): [number, number] => [(b.min[0] + b.max[0]) / 2, (b.min[1] + b.max[1]) / 2];
const cap = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);
const short = (s: string) => (s.length > 60 ? `${s.slice(0, 57)}…` : s);

/**
 * Which piece each outer body is: first a label whose centre is within 1 mm of the body's (a piece of
 * one shell), then, for a piece of several shells, a label whose bounds hold the body (the smallest
 * such); as many bodies per piece as it has shells. Any other body is a piece of its own (−1 − i).
 */
function pieceGroups(outer: Body[], labels: NonNullable<ProofInput["labels"]>, shellsOf: (i: number) => number): Map<Body, number> {
  const out = new Map<Body, number>();
  const taken = new Uint32Array(labels.length);
  const centreOf = (l: Box2) => [(l.minX + l.maxX) / 2, (l.minY + l.maxY) / 2] as const;
  for (const b of outer) {
    const [x, y] = centre(b);
    let best = -1,
      bestD = 1;
    labels.forEach((l, i) => {
      const [lx, ly] = centreOf(l.bounds);
      const d = Math.hypot(lx - x, ly - y);
      if (d < bestD) {
        best = i;
        bestD = d;
      }
    });
    if (best >= 0 && taken[best]! < shellsOf(best)) {
      out.set(b, best);
      taken[best]!++;
    }
  }
  const margin = 0.05; // the layout's bounds come from the part's hull: the same corners, rounded apart at most by float32
  outer.forEach((b, k) => {
    if (out.has(b)) return;
    let best = -1,
      bestArea = Infinity;
    labels.forEach((l, i) => {
      const r = l.bounds;
      if (shellsOf(i) < 2 || taken[i]! >= shellsOf(i)) return;
      if (b.min[0] < r.minX - margin || b.min[1] < r.minY - margin || b.max[0] > r.maxX + margin || b.max[1] > r.maxY + margin) return;
      const area = (r.maxX - r.minX) * (r.maxY - r.minY);
      if (area < bestArea) {
        best = i;
        bestArea = area;
      }
    });
    if (best >= 0) taken[best]!++;
    out.set(b, best >= 0 ? best : -1 - k);
  });
  return out;
}

function labelOf(labels: NonNullable<ProofInput["labels"]>, group: number, b: Body): string {
  const [x, y] = centre(b);
  const l = group >= 0 ? labels[group] : undefined;
  return l ? `piece ${l.number} (at ${at(x, y)})` : `the piece at ${at(x, y)}`;
}

/** The triangles (of `tris`) whose corners all lie at or below z = `atMost`. */
function flatAt(tris: Uint32Array, atMost: number, P: Float32Array, T: Uint32Array): Uint32Array {
  const out = new Uint32Array(tris.length);
  let n = 0;
  for (let i = 0; i < tris.length; i++) {
    const t = tris[i]!;
    if (Math.max(P[3 * T[3 * t]! + 2]!, P[3 * T[3 * t + 1]! + 2]!, P[3 * T[3 * t + 2]! + 2]!) <= atMost) out[n++] = t;
  }
  return out.subarray(0, n);
}

/** The slab's upward faces, highest first (by their highest corner), seen from above with their boxes. */
type SlabTop = { tris: Uint32Array; z: Float64Array; xy: Float64Array; box: Float64Array };
function slabTop(up: Uint32Array, P: Float32Array, T: Uint32Array): SlabTop {
  const zOf = (t: number) => Math.max(P[3 * T[3 * t]! + 2]!, P[3 * T[3 * t + 1]! + 2]!, P[3 * T[3 * t + 2]! + 2]!);
  const order = Array.from(up, (t) => ({ t, z: zOf(t) })).sort((a, b) => b.z - a.z);
  const tris = Uint32Array.from(order, (e) => e.t);
  const z = Float64Array.from(order, (e) => e.z);
  const xy = flat(tris, P, T);
  const box = new Float64Array(4 * tris.length);
  for (let k = 0; k < tris.length; k++) {
    const o6 = 6 * k;
    box[4 * k] = Math.min(xy[o6]!, xy[o6 + 2]!, xy[o6 + 4]!);
    box[4 * k + 1] = Math.min(xy[o6 + 1]!, xy[o6 + 3]!, xy[o6 + 5]!);
    box[4 * k + 2] = Math.max(xy[o6]!, xy[o6 + 2]!, xy[o6 + 4]!);
    box[4 * k + 3] = Math.max(xy[o6 + 1]!, xy[o6 + 3]!, xy[o6 + 5]!);
  }
  return { tris, z, xy, box };
}

/**
 * The highest slab face under a piece, or null: above the asked surface (`asked`) anything under its
 * shadow counts (an embossed mark under an overhang); at or below it, what lies under its bottom
 * facets. Faces below `floor` are far below: nothing closer lies under this piece.
 */
function highestUnder(p: Piece, top: SlabTop, asked: number, floor: number, shadowGrid: (p: Piece) => TriGrid): number | null {
  const { z: zs, box, xy } = top;
  for (let k = 0; k < zs.length; k++) {
    const z = zs[k]!;
    if (z < floor) break;
    if (
      box[4 * k]! >= p.box.maxX - 1e-3 ||
      box[4 * k + 2]! <= p.box.minX + 1e-3 ||
      box[4 * k + 1]! >= p.box.maxY - 1e-3 ||
      box[4 * k + 3]! <= p.box.minY + 1e-3
    )
      continue;
    const tri = xy.subarray(6 * k, 6 * k + 6);
    if (!p.convex.overlaps(tri, 1e-3)) continue;
    const hit = z > asked || !p.bottom ? shadowGrid(p).overlaps(tri, 1e-3) : p.bottom.overlaps(tri, 1e-3);
    if (hit) return z;
  }
  return null;
}

/** The lowest flat upward face (floors are flat: a wall a hair off vertical also faces up a little, and is not one). */
function lowestFlat(up: Uint32Array, tol: number, P: Float32Array, T: Uint32Array): { z: number; at: [number, number] } {
  let minFloor = Infinity,
    at: [number, number] = [0, 0];
  for (let i = 0; i < up.length; i++) {
    const t = up[i]!;
    const za = P[3 * T[3 * t]! + 2]!,
      zb = P[3 * T[3 * t + 1]! + 2]!,
      zc = P[3 * T[3 * t + 2]! + 2]!;
    if (Math.max(za, zb, zc) - Math.min(za, zb, zc) > tol) continue;
    const z = Math.min(za, zb, zc);
    if (z < minFloor) {
      minFloor = z;
      at = [P[3 * T[3 * t]!]!, P[3 * T[3 * t]! + 1]!];
    }
  }
  return { z: minFloor, at };
}

/** Triangles facing up, and those facing down (in their order), by `facing` (see connectedBodies). */
function splitFacing(tris: Uint32Array, facing: Int8Array): { up: Uint32Array; down: Uint32Array } {
  // Up-facing from the front of one buffer, down-facing from its back (then put back in order).
  const buf = new Uint32Array(tris.length);
  let nu = 0,
    nd = 0;
  for (let i = 0; i < tris.length; i++) {
    const t = tris[i]!;
    const f = facing[t]!;
    if (f > 0) buf[nu++] = t;
    else if (f < 0) buf[tris.length - ++nd] = t;
  }
  return { up: buf.subarray(0, nu), down: buf.subarray(tris.length - nd).reverse() };
}

/** The corners' x, y (each corner once), into `into`. */
function shadowPoints(verts: Uint32Array, P: Float32Array, into: Float64Array): Float64Array {
  for (let i = 0; i < verts.length; i++) {
    const v = 3 * verts[i]!;
    into[2 * i] = P[v]!;
    into[2 * i + 1] = P[v + 1]!;
  }
  return into.subarray(0, 2 * verts.length);
}
