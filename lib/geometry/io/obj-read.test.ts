import { beforeAll, describe, expect, it } from "vitest";
import { bytes } from "@/tests/support/meshes";
import { importMesh } from "../import";
import { loadKernel, type Kernel } from "../kernel";
import { readObj } from "./obj-read";

let kernel: Kernel;
beforeAll(async () => {
  kernel = await loadKernel();
});

// A cube written with quads (our own fixture), faces in v/vt/vn form.
const cubeObj = `# cube
o Die
v 0 0 0
v 10 0 0
v 10 10 0
v 0 10 0
v 0 0 10
v 10 0 10
v 10 10 10
v 0 10 10
vt 0 0
vn 0 0 1
f 1/1/1 4/1/1 3/1/1 2/1/1
f 5/1/1 6/1/1 7/1/1 8/1/1
f 1 2 6 5
f 2 3 7 6
f 3 4 8 7
f 4 1 5 8
`;

/** An L-shaped (concave) prism: the bottom and top are one 6-corner polygon each. */
const lObj = (() => {
  const ring: [number, number][] = [
    [0, 0],
    [20, 0],
    [20, 8],
    [8, 8],
    [8, 20],
    [0, 20],
  ];
  const lines = ["g ell"];
  for (const [x, y] of ring) lines.push(`v ${x} ${y} 0`);
  for (const [x, y] of ring) lines.push(`v ${x} ${y} 5`);
  // negative (relative) indices: -12 is the first vertex written above
  lines.push(`f ${[-7, -8, -9, -10, -11, -12].join(" ")}`); // bottom, clockwise from above = facing down
  lines.push(`f ${[-6, -5, -4, -3, -2, -1].join(" ")}`); // top
  for (let i = 0; i < 6; i++) {
    const a = i + 1,
      b = ((i + 1) % 6) + 1;
    lines.push(`f ${a} ${b} ${b + 6} ${a + 6}`);
  }
  return lines.join("\n");
})();

describe("OBJ import", () => {
  it("reads quads, v/vt/vn references and the object name", () => {
    const r = importMesh(bytes(cubeObj), kernel, { fileName: "die.obj" });
    expect(r.format).toBe("obj");
    expect(r.bodies).toHaveLength(1);
    expect(r.bodies[0]!.name).toBe("Die");
    expect(r.triangles).toBe(12);
    expect(r.volume).toBeCloseTo(1000, 6);
  });

  it("triangulates a concave polygon with earcut, not a fan, and honours negative indices", () => {
    const r = importMesh(bytes(lObj), kernel, { fileName: "ell.obj" });
    // Shoelace area of the L: 20·20 − 12·12 = 256 mm²; prism volume = area × height (handbook formulas).
    expect(r.volume).toBeCloseTo(256 * 5, 4);
    expect(r.bodies[0]!.name).toBe("ell");
    expect(r.repairs.find((x) => x.code === "flipped_inside_out")).toBeUndefined();
  });

  it("keeps o/g groups as separate objects", () => {
    const two = `${cubeObj}\n${cubeObj
      .replace("o Die", "o Die two")
      .replace(/^v (\d+) (\d+) (\d+)$/gm, (_, x, y, z) => `v ${Number(x) + 30} ${y} ${z}`)
      .replace(
        /f (\S+) (\S+) (\S+) (\S+)/g,
        (_m, ...refs: string[]) =>
          `f ${refs
            .slice(0, 4)
            .map((s) => String(Number(s.split("/")[0]) + 8))
            .join(" ")}`,
      )}`;
    const raw = readObj(bytes(two), "two.obj", { maxTriangles: 1000, maxVertices: 1000 });
    expect(raw.objects.map((o) => o.name)).toEqual(["Die", "Die two"]);
    const r = importMesh(bytes(two), kernel, { fileName: "two.obj" });
    expect(r.bodies.map((b) => b.name)).toEqual(["Die", "Die two"]);
  });

  it.each([
    ["f 1 2 9", "index_out_of_range"],
    ["f 1 2 -20", "index_out_of_range"],
    ["f 1 2", "malformed"],
    ["f 1 two 3", "malformed"],
    ["v 1 2", "malformed"],
  ])("refuses %s with %s", (line, code) => {
    const text = `v 0 0 0\nv 1 0 0\nv 0 1 0\n${line}\n`;
    expect(() => importMesh(bytes(text), kernel, { fileName: "bad.obj" })).toThrow(expect.objectContaining({ code }));
  });

  it("refuses a file with vertices but no faces", () => {
    expect(() => importMesh(bytes("v 0 0 0\nv 1 0 0\nv 0 1 0\n"), kernel, { fileName: "pts.obj" })).toThrow(
      expect.objectContaining({ code: "empty" }),
    );
  });
});
