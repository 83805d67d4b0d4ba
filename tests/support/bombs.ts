import { constants, deflateRawSync } from "node:zlib";
import { NS_CORE, REL_START_PART } from "@/lib/geometry/io/3mf-read";
import { writeZip } from "@/lib/geometry/io/zip-write";

/**
 * Hostile 3MF packages of our own making, small on the wire and huge once read: for the engine's unit
 * tests, the upload integration tests and the upload-stall benchmark.
 */
const enc = new TextEncoder();
const RELS = `<?xml version="1.0"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships"><Relationship Id="r" Target="/3D/3dmodel.model" Type="${REL_START_PART}"/></Relationships>`;
const TYPES = '<?xml version="1.0"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types"/>';

function pack(model: Uint8Array, deflate: (d: Uint8Array) => Uint8Array = (d) => deflateRawSync(d, { level: 9 })) {
  return writeZip(
    [
      { name: "[Content_Types].xml", data: enc.encode(TYPES) },
      { name: "_rels/.rels", data: enc.encode(RELS) },
      { name: "3D/3dmodel.model", data: model },
    ],
    deflate,
  );
}

const CUBE_VERTS = [0, 0, 0, 10, 0, 0, 0, 10, 0, 10, 10, 0, 0, 0, 10, 10, 0, 10, 0, 10, 10, 10, 10, 10];
// prettier-ignore
const CUBE_TRIS = [0,2,1, 1,2,3, 4,5,6, 5,7,6, 0,1,4, 1,5,4, 2,6,3, 3,6,7, 0,4,2, 2,4,6, 1,3,5, 3,7,5];
const vertsXml = (v: number[]) =>
  Array.from({ length: v.length / 3 }, (_, i) => `<vertex x="${v[i * 3]}" y="${v[i * 3 + 1]}" z="${v[i * 3 + 2]}"/>`).join("");
const trisXml = (t: number[]) =>
  Array.from({ length: t.length / 3 }, (_, i) => `<triangle v1="${t[i * 3]}" v2="${t[i * 3 + 1]}" v3="${t[i * 3 + 2]}"/>`).join("");
const head = (tag = "") => `<?xml version="1.0" encoding="UTF-8"?><model unit="millimeter" xmlns="${NS_CORE}">${tag}`;

/**
 * Nested components: object 1 is a 10 mm cube, each further object holds `fanout` copies of the one
 * below; the build item names the top. depth 12, fanout 2 → 2^12 = 4 096 cubes from about 1.2 kB.
 */
export function componentBomb(depth = 12, fanout = 2): Uint8Array {
  const objs = [
    `<object id="1" name="leaf" ` +
      `type="model"><mesh><vertices>${vertsXml(CUBE_VERTS)}</vertices><triangles>${trisXml(CUBE_TRIS)}</triangles></mesh></object>`,
  ];
  for (let level = 1; level <= depth; level++) {
    const comps = Array.from(
      { length: fanout },
      (_, i) => `<component objectid="${level}" transform="1 0 0 0 1 0 0 0 1 ${i * 11} 0 0"/>`,
    ).join("");
    objs.push(`<object id="${level + 1}" type="model"><components>${comps}</components></object>`);
  }
  return pack(enc.encode(`${head()}<resources>${objs.join("")}</resources><build><item objectid="${depth + 1}"/></build></model>`));
}

/** A cube whose object also lists `count` vertices no triangle uses (they compress to almost nothing). */
export function millionVertexFile(count = 1_000_000): Uint8Array {
  const extra = '<vertex x="0" y="0" z="0"/>'.repeat(count);
  return pack(
    enc.encode(
      `${head()}<resources><object id="1" name="cube" ` +
        `type="model"><mesh><vertices>${vertsXml(CUBE_VERTS)}${extra}</vertices><triangles>${trisXml(CUBE_TRIS)}` +
        `</triangles></mesh></object></resources><build><item objectid="1"/></build></model>`,
    ),
  );
}

/**
 * A cube model padded with `inflatedMb` MB of whitespace. The deflate stream is made of independently
 * compressed 1 MB blocks (each ends on a sync flush, so they simply follow one another), so building
 * a 400 MB bomb never holds 400 MB here. With `honest` false the ZIP directory claims the tiny size of
 * the cube model alone, so only counting the inflated bytes catches it.
 */
export function inflateBomb(inflatedMb = 400, honest = false): Uint8Array {
  const model = enc.encode(
    `${head()}<resources><object id="1" name="cube" ` +
      `type="model"><mesh><vertices>${vertsXml(CUBE_VERTS)}</vertices><triangles>${trisXml(CUBE_TRIS)}` +
      `</triangles></mesh></object></resources>`,
  );
  const tail = enc.encode(`<build><item objectid="1"/></build></model>`);
  const sync = { level: 9, finishFlush: constants.Z_SYNC_FLUSH };
  const pad = deflateRawSync(new Uint8Array(1024 * 1024).fill(0x20), sync);
  const pieces = [deflateRawSync(model, sync), ...Array.from({ length: inflatedMb }, () => pad), deflateRawSync(tail, { level: 9 })];
  const stream = Buffer.concat(pieces);
  const file = pack(model, (d) => (d === model ? stream : deflateRawSync(d)));
  if (honest) {
    // Patch the model entry's uncompressed size in the central directory to the true figure.
    const view = new DataView(file.buffer, file.byteOffset, file.byteLength);
    for (let i = file.length - 22; i >= 0; i--) {
      if (view.getUint32(i, true) !== 0x06054b50) continue;
      let p = view.getUint32(i + 16, true);
      for (let e = 0; e < view.getUint16(i + 10, true); e++) {
        const nameLen = view.getUint16(p + 28, true);
        const name = new TextDecoder().decode(file.subarray(p + 46, p + 46 + nameLen));
        if (name === "3D/3dmodel.model") view.setUint32(p + 24, model.length + inflatedMb * 1024 * 1024 + tail.length, true);
        p += 46 + nameLen + view.getUint16(p + 30, true) + view.getUint16(p + 32, true);
      }
      break;
    }
  }
  return file;
}
