import { deflateRawSync } from "node:zlib";
import { DOMParser } from "linkedom";
import { Box3, Mesh as ThreeMesh, type Object3D } from "three";
import { ThreeMFLoader } from "three/examples/jsm/loaders/3MFLoader.js";
import { unzipSync } from "fflate";
import { beforeAll, describe, expect, it } from "vitest";
import { box, bytes } from "@/tests/support/meshes";
import { importMesh } from "../import";
import { loadKernel, type Kernel } from "../kernel";
import { openOrMisorientedEdges, signedVolume, type IndexedMesh } from "../mesh";
import { NS_CORE, REL_START_PART } from "./3mf-read";
import { build3mfModel, write3mf } from "./3mf-write";
import { writeZip } from "./zip-write";

let kernel: Kernel;
beforeAll(async () => {
  kernel = await loadKernel();
  // three's 3MFLoader needs a DOM with querySelectorAll in Node; linkedom provides one.
  (globalThis as { DOMParser?: unknown }).DOMParser = DOMParser;
});

const SLAB_T = 1.0;
const GAP = 0.25;

/** A small plate of our own: a 60 × 40 × 1 slab and three boxes standing a gap above it. */
function smallPlate(): { name: string; mesh: IndexedMesh; partNumber: string }[] {
  const lift = SLAB_T + GAP;
  return [
    { name: "Slab", mesh: box(60, 40, SLAB_T), partNumber: "slab" },
    { name: "Piece 1", mesh: box(10, 10, 5, [5, 5, lift]), partNumber: "1" },
    { name: "Piece 2", mesh: box(12, 8, 3, [25, 5, lift]), partNumber: "2" },
    { name: "Piece 3", mesh: box(8, 20, 7, [45, 12, lift]), partNumber: "3" },
  ];
}

const model3mf = (xml: string, extra: { name: string; data: Uint8Array }[] = []) =>
  writeZip([
    {
      name: "[Content_Types].xml",
      data: bytes('<?xml version="1.0"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"/>'),
    },
    {
      name: "_rels/.rels",
      data: bytes(
        `<?xml version="1.0"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="r" Target="/3D/3dmodel.model" Type="${REL_START_PART}"/></Relationships>`,
      ),
    },
    { name: "3D/3dmodel.model", data: bytes(xml) },
    ...extra,
  ]);

const cubeObject = (id: number, name: string, size = 10) => {
  const m = box(size, size, size);
  const v = [...Array(8).keys()]
    .map((i) => `<vertex x="${m.vertProperties[i * 3]}" y="${m.vertProperties[i * 3 + 1]}" z="${m.vertProperties[i * 3 + 2]}"/>`)
    .join("");
  const t = [...Array(12).keys()]
    .map((i) => `<triangle v1="${m.triVerts[i * 3]}" v2="${m.triVerts[i * 3 + 1]}" v3="${m.triVerts[i * 3 + 2]}"/>`)
    .join("");
  return `<object id="${id}" name="${name}" type="model"><mesh><vertices>${v}</vertices><triangles>${t}</triangles></mesh></object>`;
};
const modelXml = (resources: string, build: string, attrs = "") =>
  `<?xml version="1.0" encoding="UTF-8"?><model unit="millimeter" xmlns="${NS_CORE}" ` +
  `${attrs}><resources>${resources}</resources><build>${build}</build></model>`;

describe("3MF export (3MF Core Specification 1.4.0)", () => {
  const file = write3mf(smallPlate(), { title: "Test plate", creationDate: new Date("2026-12-01T00:00:00Z") }, (d) =>
    deflateRawSync(d, { level: 1 }),
  );

  it("is a package with content types, the start-part relationship and the model part, and no directory entries", () => {
    const entries = unzipSync(file);
    expect(Object.keys(entries).sort()).toEqual(["3D/3dmodel.model", "[Content_Types].xml", "_rels/.rels"]);
    const types = new TextDecoder().decode(entries["[Content_Types].xml"]);
    expect(types).toContain('Extension="model" ContentType="application/vnd.ms-package.3dmanufacturing-3dmodel+xml"');
    expect(types).toContain('Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"');
    const rels = new TextDecoder().decode(entries["_rels/.rels"]);
    expect(rels).toContain(`Type="${REL_START_PART}"`);
    expect(rels).toContain('Target="/3D/3dmodel.model"');
    const model = new TextDecoder().decode(entries["3D/3dmodel.model"]);
    expect(model).toContain(`xmlns="${NS_CORE}"`);
    expect(model).toContain('unit="millimeter"');
    expect(model).not.toContain("<!DOCTYPE");
    for (const name of ["Title", "Application", "CreationDate"]) expect(model).toContain(`<metadata name="${name}">`);
    expect(model).toMatch(/<build><item objectid="5"\/><\/build>/); // one build item: the assembly
    expect(model).toContain('partnumber="2"');
    expect(model).not.toMatch(/\d[eE][+-]?\d/); // no exponents
  });

  it("has every mesh object manifold per the spec: each edge twice in opposite order, outward, ≥ 4 triangles", () => {
    const r = importMesh(file, kernel, { fileName: "plate.3mf" });
    expect(r.bodies.map((b) => b.name)).toEqual(["Slab", "Piece 1", "Piece 2", "Piece 3"]);
    for (const b of r.bodies) {
      expect(openOrMisorientedEdges(b.mesh)).toBe(0);
      expect(signedVolume(b.mesh)).toBeGreaterThan(0);
      expect(b.triangles).toBeGreaterThanOrEqual(4);
    }
    expect(r.repairs).toEqual([]);
  });

  it("is read back by three.js's 3MFLoader, and after the build transforms every piece's lowest point is at slab thickness + gap", () => {
    const group = new ThreeMFLoader().parse(file.buffer.slice(file.byteOffset, file.byteOffset + file.byteLength) as ArrayBuffer);
    group.updateMatrixWorld(true);
    const meshes: ThreeMesh[] = [];
    group.traverse((o: Object3D) => {
      if ((o as ThreeMesh).isMesh) meshes.push(o as ThreeMesh);
    });
    expect(meshes).toHaveLength(4);
    const lows = meshes.map((m) => new Box3().setFromObject(m).min.z).sort((a, b) => a - b);
    expect(lows[0]).toBeCloseTo(0, 6); // the slab sits on the bed
    for (const z of lows.slice(1)) expect(z).toBeCloseTo(SLAB_T + GAP, 6);
    const tris = meshes.reduce((s, m) => s + (m.geometry.index?.count ?? m.geometry.getAttribute("position").count) / 3, 0);
    expect(tris).toBe(48);
  });

  it("round-trips: import(export(x)) has the same volume, bounds and body count", () => {
    const plate = smallPlate();
    const r = importMesh(file, kernel, { fileName: "plate.3mf" });
    expect(r.bodies).toHaveLength(plate.length);
    plate.forEach((p, i) => {
      expect(r.bodies[i]!.volume).toBeCloseTo(signedVolume(p.mesh), 4);
    });
    expect(r.bounds.min).toEqual([0, 0, 0]);
    expect(r.bounds.max[2]).toBeCloseTo(SLAB_T + GAP + 7, 4);
  });

  it("writes numbers rounded to 0.0001 mm without exponents or negative zero", () => {
    const tiny: IndexedMesh = {
      vertProperties: new Float32Array([1e-7, -0, 123.456789, 0.00007, 2, 3, 4, 5, 6]),
      triVerts: new Uint32Array([0, 1, 2]),
    };
    const xml = build3mfModel([{ name: "t", mesh: tiny }], { title: "t" });
    expect(xml).toContain('<vertex x="0" y="0" z="123.4568"/>');
    expect(xml).toContain('<vertex x="0.0001" y="2" z="3"/>');
  });
});

describe("3MF import", () => {
  it("applies component and build-item transforms, and every unit", () => {
    const xml = modelXml(
      cubeObject(1, "Cube") +
        `<object id="2" name="Pair" type="model"><components><component objectid="1"/><component objectid="1" transform="1 0 0 0 1 0 ` +
        `0 0 1 20 0 0"/></components></object>`,
      `<item objectid="2" transform="1 0 0 0 1 0 0 0 1 5 5 0"/>`,
    );
    const r = importMesh(model3mf(xml), kernel, { fileName: "pair.3mf" });
    expect(r.bodies.map((b) => b.name)).toEqual(["Cube", "Cube (2)"]);
    expect(r.bounds.min).toEqual([5, 5, 0]);
    expect(r.bounds.max).toEqual([35, 15, 10]);
    const inches = importMesh(model3mf(xml.replace('unit="millimeter"', 'unit="inch"')), kernel, { fileName: "pair.3mf" });
    expect(inches.unit).toBe("inch");
    expect(inches.volume).toBeCloseTo(2 * 1000 * 25.4 ** 3, 0); // 1 in = 25.4 mm exactly
  });

  it("keeps a mirroring build transform outward", () => {
    const xml = modelXml(cubeObject(1, "Cube"), `<item objectid="1" transform="-1 0 0 0 1 0 0 0 1 0 0 0"/>`);
    const r = importMesh(model3mf(xml), kernel, { fileName: "mirror.3mf" });
    expect(r.volume).toBeCloseTo(1000, 6);
    expect(r.repairs.find((x) => x.code === "flipped_inside_out")).toBeUndefined();
  });

  it("refuses production-extension p:path references with a clear code", () => {
    const xml = modelXml(
      `<object id="2" type="model"><components><component objectid="1" p:path="/3D/other.model"/></components></object>`,
      `<item objectid="2"/>`,
      `xmlns:p="http://schemas.microsoft.com/3dmanufacturing/production/2015/06"`,
    );
    expect(() => importMesh(model3mf(xml), kernel, { fileName: "prod.3mf" })).toThrow(
      expect.objectContaining({ code: "unsupported_extension" }),
    );
  });

  it("refuses a required extension it does not read", () => {
    const xml = modelXml(
      cubeObject(1, "Cube"),
      `<item objectid="1"/>`,
      `xmlns:b="http://schemas.microsoft.com/3dmanufacturing/beamlattice/2017/02" requiredextensions="b"`,
    );
    expect(() => importMesh(model3mf(xml), kernel, { fileName: "beam.3mf" })).toThrow(
      expect.objectContaining({ code: "unsupported_extension" }),
    );
  });

  it("refuses XML with a DTD or entities", () => {
    const xml =
      `<?xml version="1.0"?><!DOCTYPE model [<!ENTITY a "aaaaaaaaaa"><!ENTITY b "&a;&a;&a;&a;&a;">]>` +
      modelXml(cubeObject(1, "&b;"), `<item objectid="1"/>`).replace(/^<\?xml[^>]*>/, "");
    expect(() => importMesh(model3mf(xml), kernel, { fileName: "dtd.3mf" })).toThrow(
      expect.objectContaining({ code: "xml_dtd_forbidden" }),
    );
  });

  it.each([
    [
      "a triangle index out of range",
      modelXml(cubeObject(1, "C").replace('v3="1"', 'v3="99"'), `<item objectid="1"/>`),
      "index_out_of_range",
    ],
    [
      "a NaN-free but non-numeric coordinate",
      modelXml(cubeObject(1, "C").replace('x="10"', 'x="ten"'), `<item objectid="1"/>`),
      "malformed",
    ],
    ["a build item naming a missing object", modelXml(cubeObject(1, "C"), `<item objectid="7"/>`), "malformed"],
    ["no build items", modelXml(cubeObject(1, "C"), ""), "empty"],
    ["broken XML", modelXml(cubeObject(1, "C"), `<item objectid="1">`), "malformed"],
  ])("refuses %s", (_what, xml, code) => {
    expect(() => importMesh(model3mf(xml), kernel, { fileName: "bad.3mf" })).toThrow(expect.objectContaining({ code }));
  });

  it("refuses a package cut short", () => {
    const file = model3mf(modelXml(cubeObject(1, "C"), `<item objectid="1"/>`));
    expect(() => importMesh(file.slice(0, file.length - 30), kernel, { fileName: "cut.3mf" })).toThrow(
      expect.objectContaining({ code: "truncated" }),
    );
  });

  it("refuses a large zip bomb from its directory, without inflating it", () => {
    // A package whose directory declares 1.5 GB of content (past the 1 GB default).
    const file = model3mf(modelXml(cubeObject(1, "C"), `<item objectid="1"/>`));
    const view = new DataView(file.buffer);
    let cd = -1;
    for (let i = file.length - 22; i >= 0; i--)
      if (view.getUint32(i, true) === 0x06054b50) {
        cd = view.getUint32(i + 16, true);
        break;
      }
    view.setUint32(cd + 24, 1_500_000_000, true); // first entry's uncompressed size
    const started = performance.now();
    expect(() => importMesh(file, kernel, { fileName: "bomb.3mf" })).toThrow(expect.objectContaining({ code: "archive_too_large" }));
    expect(performance.now() - started).toBeLessThan(200);
  });

  it("stops inflating an entry that lies about its size the moment it passes the limit", () => {
    // 60 MB of zeros deflate to about 60 kB; the directory claims 1 kB.
    const zeros = new Uint8Array(60_000_000);
    const file = writeZip([{ name: "_rels/.rels", data: zeros }], (d) => deflateRawSync(d, { level: 9 }));
    const view = new DataView(file.buffer);
    let cd = -1;
    for (let i = file.length - 22; i >= 0; i--)
      if (view.getUint32(i, true) === 0x06054b50) {
        cd = view.getUint32(i + 16, true);
        break;
      }
    view.setUint32(cd + 24, 1000, true);
    expect(() => importMesh(file, kernel, { fileName: "liar.3mf", limits: { maxInflatedBytes: 10_000_000 } })).toThrow(
      expect.objectContaining({ code: "archive_too_large" }),
    );
  });
});
