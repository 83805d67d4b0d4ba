import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { box } from "@/tests/support/meshes";
import { hexTile, pawn } from "../demo-shapes";
import { signedVolume, triangleCount } from "../mesh";
import { writeBinaryStl } from "./stl-write";

const dir = mkdtempSync(path.join(tmpdir(), "slab-admesh-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/**
 * Debian's admesh, an independent STL checker. It exits 0 even on broken input and repairs by
 * default, so its report is parsed rather than its exit code trusted.
 */
function admesh(stl: Uint8Array) {
  const file = path.join(dir, `m${Math.random().toString(36).slice(2)}.stl`);
  writeFileSync(file, stl);
  const res = spawnSync("admesh", [file], { encoding: "utf8" });
  if (res.error) throw new Error(`admesh is not installed (npm test installs Debian's admesh): ${res.error.message}`);
  const num = (label: string) => {
    const m = new RegExp(`${label}\\s*:\\s*(-?[\\d.]+)`).exec(res.stdout);
    if (!m) throw new Error(`admesh printed no "${label}":\n${res.stdout}`);
    return Number(m[1]);
  };
  const facets = /Number of facets\s*:\s*(\d+)\s+(\d+)/.exec(res.stdout);
  return {
    facets: Number(facets?.[1]),
    parts: num("Number of parts"),
    volume: num("Volume"),
    edgesFixed: num("Edges fixed"),
    facetsReversed: num("Facets reversed"),
    backwardsEdges: num("Backwards edges"),
    disconnected: num("Total disconnected facets"),
  };
}

describe("binary STL export checked by admesh", () => {
  it("reports the bodies as closed parts with nothing to fix, and the same volume", () => {
    const bodies = [hexTile(), pawn(48), box(10, 10, 10, [40, 0, 0])];
    const stl = writeBinaryStl(bodies);
    const n = bodies.reduce((s, b) => s + triangleCount(b), 0);
    expect(stl.byteLength).toBe(84 + 50 * n); // STL size rule
    const r = admesh(stl);
    expect(r.facets).toBe(n);
    expect(r.parts).toBe(3);
    expect(r.edgesFixed).toBe(0);
    expect(r.facetsReversed).toBe(0);
    expect(r.backwardsEdges).toBe(0);
    expect(r.disconnected).toBe(0);
    const ours = bodies.reduce((s, b) => s + signedVolume(b), 0);
    expect(Math.abs(r.volume - ours) / ours).toBeLessThan(1e-5); // within float32 rounding
  });

  it("makes admesh find a hole when one exists (the check can fail)", () => {
    const open = box(10, 10, 10);
    const r = admesh(writeBinaryStl([{ vertProperties: open.vertProperties, triVerts: open.triVerts.slice(3) }]));
    expect(r.disconnected).toBeGreaterThan(0);
  });

  it("writes odd and even facet records alike (alignment-split writer)", () => {
    const m = box(3, 4, 5, [1, 2, 3]);
    const stl = writeBinaryStl([m, m]); // 24 facets: both record alignments, twice
    const view = new DataView(stl.buffer);
    for (let f = 0; f < 24; f++) {
      const t = (f % 12) * 3;
      for (let c = 0; c < 3; c++) {
        const v = m.triVerts[t + c]! * 3;
        for (let a = 0; a < 3; a++) expect(view.getFloat32(84 + 50 * f + 12 + 12 * c + 4 * a, true)).toBe(m.vertProperties[v + a]);
      }
      expect(view.getUint16(84 + 50 * f + 48, true)).toBe(0);
      const nz = view.getFloat32(84 + 50 * f + 8, true);
      const nx = view.getFloat32(84 + 50 * f, true);
      const ny = view.getFloat32(84 + 50 * f + 4, true);
      expect(Math.hypot(nx, ny, nz)).toBeCloseTo(1, 6);
    }
  });
});
