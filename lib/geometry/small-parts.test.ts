import { describe, expect, it } from "vitest";
import { CYLINDER_LONGEST, SMALL_PARTS_CYLINDER, smallPartsFit, type CylinderFit } from "./small-parts";

// The fixture of 16 CFR 1501.4, Figure 1, in its English dimensions: 1.25 in across, the floor
// falling from 1.00 in deep on one side to 2.25 in on the other (a 45° floor: 1.25 in over 1.25 in).
const D = 1.25 * 25.4,
  R = D / 2,
  SHALLOW = 1.0 * 25.4,
  DEEP = 2.25 * 25.4;

/** Every vertex of a placement inside the fixture, checked with the figure's dimensions directly. */
function inside(positions: ArrayLike<number>, fit: CylinderFit): boolean {
  if (fit.verdict !== "fits") return false;
  const m = fit.rotation,
    c = fit.center,
    t = fit.offset;
  for (let i = 0; i < positions.length; i += 3) {
    const v = [positions[i]! - c[0], positions[i + 1]! - c[1], positions[i + 2]! - c[2]];
    const x = m[0]! * v[0]! + m[1]! * v[1]! + m[2]! * v[2]! + t[0];
    const y = m[3]! * v[0]! + m[4]! * v[1]! + m[5]! * v[2]! + t[1];
    const h = m[6]! * v[0]! + m[7]! * v[1]! + m[8]! * v[2]! + t[2];
    const floor = SHALLOW + ((x + R) / D) * (DEEP - SHALLOW); // the floor's depth across the cylinder
    if (x * x + y * y > R * R + 1e-6 || h < -1e-6 || h > floor + 1e-6) return false;
  }
  return true;
}

function box(w: number, d: number, h: number): Float32Array {
  const out: number[] = [];
  for (let c = 0; c < 8; c++) out.push(c & 1 ? w : 0, c & 2 ? d : 0, c & 4 ? h : 0);
  return new Float32Array(out);
}

function turned(p: Float32Array, axis: [number, number, number], deg: number): Float32Array {
  const [ax, ay, az] = axis.map((v) => v / Math.hypot(...axis)) as [number, number, number];
  const a = (deg * Math.PI) / 180,
    c = Math.cos(a),
    s = Math.sin(a),
    k = 1 - c;
  // Rodrigues' rotation formula.
  const m = [
    c + ax * ax * k,
    ax * ay * k - az * s,
    ax * az * k + ay * s,
    ay * ax * k + az * s,
    c + ay * ay * k,
    ay * az * k - ax * s,
    az * ax * k - ay * s,
    az * ay * k + ax * s,
    c + az * az * k,
  ];
  const out = new Float32Array(p.length);
  for (let i = 0; i < p.length; i += 3) {
    for (let r = 0; r < 3; r++) out[i + r] = m[r * 3]! * p[i]! + m[r * 3 + 1]! * p[i + 1]! + m[r * 3 + 2]! * p[i + 2]!;
  }
  return out;
}

/** A UV sphere's vertices (on the sphere, so its hull lies inside it). */
function sphere(radius: number, rings = 24, segments = 48): Float32Array {
  const out: number[] = [0, 0, radius, 0, 0, -radius];
  for (let i = 1; i < rings; i++) {
    const phi = (Math.PI * i) / rings;
    for (let j = 0; j < segments; j++) {
      const th = (2 * Math.PI * j) / segments;
      out.push(radius * Math.sin(phi) * Math.cos(th), radius * Math.sin(phi) * Math.sin(th), radius * Math.cos(phi));
    }
  }
  return new Float32Array(out);
}

/**
 * A round bar `diameter` across, flat on top at z = top, its bottom cut at 45°: z = r + x, so it is
 * `top` long on one side and `top − diameter` on the other.
 */
function slantCut(diameter: number, top: number, segments = 96): Float32Array {
  const r = diameter / 2;
  const out: number[] = [];
  for (let j = 0; j < segments; j++) {
    const th = (2 * Math.PI * j) / segments;
    const x = r * Math.cos(th),
      y = r * Math.sin(th);
    out.push(x, y, top, x, y, r + x);
  }
  return new Float32Array(out);
}

describe("the small-parts cylinder (16 CFR 1501.4)", () => {
  it("has the figure's dimensions and a longest inner segment of √(D² + deep²)", () => {
    // 16 CFR 1501.4 Figure 1, English dimensions (1501.4(a): they are the ones used for compliance).
    expect(SMALL_PARTS_CYLINDER).toEqual({ diameter: 31.75, shallow: 25.4, deep: 57.15 });
    // Handbook: rim point on the shallow side to the floor's deepest point, across the full diameter.
    expect(CYLINDER_LONGEST).toBeCloseTo(Math.sqrt(31.75 ** 2 + 57.15 ** 2), 9); // 65.38 mm
  });

  it("finds the 5 × 5 × 45 mm bar turned 45° about Z (box 35.4 × 35.4 × 5): it stands upright", () => {
    // Standing on end, its 5 × 5 section (7.07 mm diagonal) sits in the 31.75 mm circle, and 45 mm is
    // less than the floor's depth anywhere past the middle (41.3 mm on the axis, 57.15 at the deep wall).
    const bar = turned(box(5, 5, 45), [0, 1, 0], 90); // lying along x
    const part = turned(bar, [0, 0, 1], 45);
    const fit = smallPartsFit(part);
    expect(fit.verdict).toBe("fits");
    expect(inside(part, fit)).toBe(true);
  });

  it.each([
    [60, 3],
    [58, 4],
  ])("finds the %s mm rod (%s mm square): it leans from the deep corner to the shallow rim", (length, side) => {
    // It cannot stand upright (longer than the 57.15 mm deepest point) nor lie on the floor (longer
    // than the floor's long axis, 31.75·√2 = 44.9 mm), but the longest segment inside is 65.4 mm: laid
    // in the middle plane at 61.2° below the rim, the rod spans L·cos θ + w·sin θ across, under the
    // 2·√(R² − (w/2)²) the circle leaves at its sides (60 mm: 31.53 of 31.61 mm), its top corner at
    // the rim and its bottom corner on the 45° floor. The hand placement is checked here first.
    const theta = (61.2 * Math.PI) / 180;
    const rod = box(length, side, side);
    const hand = handPlacement(length, side, theta);
    expect(insideFixture(hand)).toBe(true);
    const fit = smallPartsFit(rod);
    expect(fit.verdict).toBe("fits");
    expect(inside(rod, fit)).toBe(true);
    // Any way it comes in (the search does not depend on the part's own axes).
    const tilted = turned(rod, [1, 2, 3], 37);
    const again = smallPartsFit(tilted);
    expect(again.verdict).toBe("fits");
    expect(inside(tilted, again)).toBe(true);
  });

  it("finds a 31 mm ball: it sits in the 31.75 mm circle, above the floor", () => {
    // Centred on the axis at depth h₀ it needs h₀ ≥ r (under the rim) and a distance (A − h₀)/√2 ≥ r
    // to the 45° floor, A = 41.275 mm: 15.5 ≤ h₀ ≤ 41.275 − 15.5·√2 = 19.35. Its box (31 mm cube) does not fit.
    const ball = sphere(15.5);
    const fit = smallPartsFit(ball);
    expect(fit.verdict).toBe("fits");
    expect(inside(ball, fit)).toBe(true);
  });

  it("rules out a 33 mm cube: too wide in every orientation", () => {
    // A cube is at least its edge (33 mm) wide in every direction; anything inside the cylinder is at
    // most 31.75 mm wide across it. The search must prove it for every orientation.
    expect(smallPartsFit(box(33, 33, 33))).toMatchObject({ verdict: "does_not_fit" });
    expect(smallPartsFit(turned(box(33, 33, 33), [1, 1, 0], 20))).toMatchObject({ verdict: "does_not_fit" });
  });

  it("rules out a 20 × 20 × 60 mm block: its diagonal is longer than any segment inside", () => {
    // √(20² + 20² + 60²) = 66.3 mm > 65.4 mm, the fixture's longest segment. (Its box's two larger
    // sides, 20 and 60, were what the old check compared; 60 mm also exceeds the 57.15 mm depth.)
    const fit = smallPartsFit(turned(box(20, 20, 60), [1, 0, 1], 30));
    expect(fit.verdict).toBe("does_not_fit");
  });

  it("finds a bar cut at 45° that fits only with its cut end flat on the sloped floor", () => {
    // A 30 mm round bar, 56 mm long on one side and 26 on the other (a 45° cut, like the floor).
    // Upside down with its flat end at the rim and the cut lying on the floor, the cut sits at
    // depth 41 + x against the floor's 41.275 + x: 0.275 mm to spare, and 0.875 mm at the wall.
    // Turned any other way about its axis or tilted by more than about 1°, the long side meets the
    // floor or the wall: the search has to find that narrow window.
    const bar = slantCut(30, 56);
    // So narrow a window takes more search than a build spends by default; there it is "may fit",
    // which flags it all the same.
    expect(smallPartsFit(turned(bar, [0.3, 1, 0.2], 71)).verdict).not.toBe("does_not_fit");
    const fit = smallPartsFit(turned(bar, [0.3, 1, 0.2], 71), { budget: 8e6 });
    expect(fit.verdict).toBe("fits");
    expect(inside(turned(bar, [0.3, 1, 0.2], 71), fit)).toBe(true);
  });

  it("answers may-fit, never does-not-fit, for a part that fits only within the search's margin", () => {
    // The ball grown to exactly the cylinder's diameter: it fits touching the wall all round, with no
    // room to spare, so the proof either finds it or stops within its stated margin.
    const fit = smallPartsFit(sphere(R, 12, 24));
    expect(fit.verdict).not.toBe("does_not_fit");
    if (fit.verdict === "may_fit") expect(fit.within).toBeLessThan(0.5);
    else expect(inside(sphere(R, 12, 24), fit)).toBe(true);
  });
});

/** The rod's eight corners in the fixture frame (x across, y across, h down), laid at angle θ below the rim. */
function handPlacement(length: number, side: number, theta: number): number[][] {
  const d = [Math.cos(theta), Math.sin(theta)],
    n = [-Math.sin(theta), Math.cos(theta)];
  const corners = [-1, 1].flatMap((a) =>
    [-1, 1].map((b) => [(a * length * d[0]!) / 2 + (b * side * n[0]!) / 2, (a * length * d[1]!) / 2 + (b * side * n[1]!) / 2]),
  );
  // Centred across, then lowered until its top corner meets the rim.
  const minX = Math.min(...corners.map((c) => c[0]!)),
    maxX = Math.max(...corners.map((c) => c[0]!));
  const minH = Math.min(...corners.map((c) => c[1]!));
  const tx = -(minX + maxX) / 2;
  return corners.flatMap(([x, h]) => [-1, 1].map((s) => [x! + tx, (s * side) / 2, h! - minH]));
}

function insideFixture(points: number[][]): boolean {
  return points.every(([x, y, h]) => x! * x! + y! * y! <= R * R && h! >= 0 && h! <= SHALLOW + ((x! + R) / D) * (DEEP - SHALLOW));
}
