import type { IndexedMesh } from "../mesh";
import { NS_CORE, REL_START_PART } from "./3mf-read";
import { writeZip, type DeflateRaw } from "./zip-write";

export type ThreeMfBody = { name: string; mesh: IndexedMesh; partNumber?: string };
export type ThreeMfMeta = { title: string; application?: string; creationDate?: Date; designer?: string; description?: string };

const CONTENT_TYPES =
  '<?xml version="1.0" encoding="UTF-8"?>\n' +
  '<Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">' +
  '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>' +
  '<Default Extension="model" ContentType="application/vnd.ms-package.3dmanufacturing-3dmodel+xml"/>' +
  "</Types>";

const RELS =
  '<?xml version="1.0" encoding="UTF-8"?>\n' +
  '<Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
  `<Relationship Id="rel0" Target="/3D/3dmodel.model" Type="${REL_START_PART}"/>` +
  "</Relationships>";

/**
 * Numbers rounded to 0.0001 mm and written without exponents: the 3MF core schema's ST_Number allows
 * exponents, but some readers do not, and four decimals is far below any printer's resolution while
 * keeping the XML about a fifth smaller than full float printing.
 */
function num(v: number): string {
  const r = Math.round(v * 10000) / 10000;
  if (r === 0) return "0"; // also turns -0 into 0
  const s = String(r);
  return s.includes("e") ? r.toFixed(4) : s;
}

function escapeXml(s: string): string {
  return s.replace(/[<>&"']/g, (c) => ({ "<": "&lt;", ">": "&gt;", "&": "&amp;", '"': "&quot;", "'": "&apos;" })[c]!);
}

/**
 * 3MF Core Specification 1.4.0: one mesh object per body and one components object holding them all,
 * with a single build item. A reader that places each build item on the bed on its own (dropping it
 * to z = 0) therefore keeps the bodies' relative heights — the air gap between slab and parts.
 */
export function build3mfModel(bodies: ThreeMfBody[], meta: ThreeMfMeta): string {
  const chunks: string[] = [];
  const date = (meta.creationDate ?? new Date()).toISOString().slice(0, 10);
  chunks.push(
    '<?xml version="1.0" encoding="UTF-8"?>\n',
    `<model unit="millimeter" xml:lang="en-US" xmlns="${NS_CORE}">\n`,
    `<metadata name="Title">${escapeXml(meta.title)}</metadata>\n`,
    `<metadata name="Application">${escapeXml(meta.application ?? "Slabwright")}</metadata>\n`,
    `<metadata name="CreationDate">${date}</metadata>\n`,
  );
  if (meta.designer) chunks.push(`<metadata name="Designer">${escapeXml(meta.designer)}</metadata>\n`);
  if (meta.description) chunks.push(`<metadata name="Description">${escapeXml(meta.description)}</metadata>\n`);
  chunks.push("<resources>\n");
  bodies.forEach((b, i) => {
    const pn = b.partNumber ? ` partnumber="${escapeXml(b.partNumber)}"` : "";
    chunks.push(`<object id="${i + 1}" type="model" name="${escapeXml(b.name)}"${pn}><mesh><vertices>\n`);
    const p = b.mesh.vertProperties;
    const part: string[] = [];
    for (let v = 0; v < p.length; v += 3) part.push(`<vertex x="${num(p[v]!)}" y="${num(p[v + 1]!)}" z="${num(p[v + 2]!)}"/>`);
    chunks.push(part.join("\n"), "\n</vertices><triangles>\n");
    const t = b.mesh.triVerts;
    const tris: string[] = [];
    for (let k = 0; k < t.length; k += 3) tris.push(`<triangle v1="${t[k]}" v2="${t[k + 1]}" v3="${t[k + 2]}"/>`);
    chunks.push(tris.join("\n"), "\n</triangles></mesh></object>\n");
  });
  const assembly = bodies.length + 1;
  chunks.push(`<object id="${assembly}" type="model" name="${escapeXml(meta.title)}"><components>\n`);
  bodies.forEach((_, i) => chunks.push(`<component objectid="${i + 1}"/>\n`));
  chunks.push("</components></object>\n</resources>\n", `<build><item objectid="${assembly}"/></build>\n</model>\n`);
  return chunks.join("");
}

export function write3mf(bodies: ThreeMfBody[], meta: ThreeMfMeta, deflateRaw?: DeflateRaw): Uint8Array {
  const model = new TextEncoder().encode(build3mfModel(bodies, meta));
  const enc = new TextEncoder();
  return writeZip(
    [
      { name: "[Content_Types].xml", data: enc.encode(CONTENT_TYPES) },
      { name: "_rels/.rels", data: enc.encode(RELS) },
      { name: "3D/3dmodel.model", data: model },
    ],
    deflateRaw,
    meta.creationDate,
  );
}
