import { deflateRawSync } from "node:zlib";
import { beforeAll, describe, expect, it } from "vitest";
import { asciiStl, box, bytes } from "@/tests/support/meshes";
import { hexTile, pawn } from "./demo-shapes";
import { MeshImportError } from "./errors";
import { importMesh } from "./import";
import { write3mf } from "./io/3mf-write";
import { writeBinaryStl } from "./io/stl-write";
import { loadKernel, type Kernel } from "./kernel";

let kernel: Kernel;
beforeAll(async () => {
  kernel = await loadKernel();
});

/** A small deterministic generator (mulberry32), so a failure can be replayed. */
function rng(seed: number) {
  return () => {
    seed = (seed + 0x6d2b79f5) | 0;
    let t = Math.imul(seed ^ (seed >>> 15), 1 | seed);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

describe("damaged files", () => {
  const seeds: [string, Uint8Array][] = [
    ["binary.stl", writeBinaryStl([hexTile()])],
    ["ascii.stl", bytes(asciiStl(box(4, 5, 6)))],
    ["part.obj", bytes("o P\nv 0 0 0\nv 9 0 0\nv 0 9 0\nv 0 0 9\nf 1 3 2\nf 1 2 4\nf 2 3 4\nf 1 4 3\n")],
    ["plate.3mf", write3mf([{ name: "A", mesh: pawn(12) }], { title: "t" }, (d) => deflateRawSync(d))],
  ];

  it("either import or give a typed refusal — never another exception, never a hang", () => {
    const random = rng(20261201);
    const started = performance.now();
    let refused = 0;
    for (const [name, original] of seeds) {
      for (let round = 0; round < 150; round++) {
        const data = original.slice(0, random() < 0.2 ? Math.floor(random() * original.length) : original.length);
        const flips = 1 + Math.floor(random() * 8);
        for (let i = 0; i < flips && data.length > 0; i++) data[Math.floor(random() * data.length)] = Math.floor(random() * 256);
        try {
          importMesh(data, kernel, { fileName: name });
        } catch (err) {
          if (!(err instanceof MeshImportError)) throw new Error(`${name} round ${round}: ${String(err)}`, { cause: err });
          expect(err.message.length).toBeGreaterThan(name.length + 5);
          refused++;
        }
      }
    }
    expect(refused).toBeGreaterThan(100);
    expect(kernel.live()).toBe(0);
    expect(performance.now() - started).toBeLessThan(20_000);
  });

  it("round-trips STL: import(export(x)) keeps volume, bounds and body count", () => {
    const bodies = [hexTile(), pawn(32)];
    const first = importMesh(writeBinaryStl(bodies), kernel, { fileName: "two.stl" });
    const again = importMesh(writeBinaryStl(first.bodies.map((b) => b.mesh)), kernel, { fileName: "two.stl" });
    expect(again.bodies).toHaveLength(2);
    expect(again.volume).toBeCloseTo(first.volume, 6);
    expect(again.bounds).toEqual(first.bounds);
  });
});
