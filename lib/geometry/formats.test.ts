import { describe, expect, it } from "vitest";
import {
  ACCEPT_ATTRIBUTE,
  ACCEPTED_FORMATS,
  EXPORT_FORMAT_IDS,
  EXPORT_FORMATS,
  importFormatByName,
  isExportFormat,
  sniffImportFormat,
  stripImportExtension,
} from "./formats";
import { writeBinaryStl } from "./io/stl-write";

describe("the format registry", () => {
  it("tells formats from their first bytes", () => {
    // A binary STL of one triangle: 80-byte header, count 1, 50 bytes (the layout of the STL format as
    // published with the StereoLithography Interface Specification, 3D Systems, 1989).
    const stl = writeBinaryStl([{ vertProperties: new Float32Array([0, 0, 0, 1, 0, 0, 0, 1, 0]), triVerts: new Uint32Array([0, 1, 2]) }]);
    expect(stl.byteLength).toBe(84 + 50);
    expect(sniffImportFormat(stl, stl.byteLength)).toBe("stl");
    // Only the first 4 kB of a stored stream, with its real size: still a binary STL by 84 + 50·n.
    expect(sniffImportFormat(stl.subarray(0, 84), stl.byteLength)).toBe("stl");
    expect(sniffImportFormat(stl.subarray(0, 84), stl.byteLength + 1)).toBeNull();
    const ascii = new TextEncoder().encode("solid t\n facet normal 0 0 1\n outer loop\n vertex 0 0 0\n endloop\n endfacet\nendsolid t\n");
    expect(sniffImportFormat(ascii, ascii.byteLength)).toBe("stl");
    // 3MF is an OPC zip package (3MF Core Specification §2): "PK\x03\x04" first.
    expect(sniffImportFormat(new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0, 0]), 6)).toBe("3mf");
    const obj = new TextEncoder().encode("# a triangle\nv 0 0 0\nv 1 0 0\nv 0 1 0\nf 1 2 3\n");
    expect(sniffImportFormat(obj, obj.byteLength)).toBe("obj");
    expect(sniffImportFormat(new TextEncoder().encode("%PDF-1.7"), 8)).toBeNull();
  });

  it("derives names, the accept list and the export formats from one table", () => {
    expect(ACCEPTED_FORMATS).toEqual(["STL (binary or ASCII)", "3MF", "OBJ"]);
    expect(ACCEPT_ATTRIBUTE.split(",")).toEqual(expect.arrayContaining([".stl", ".3mf", ".obj", "model/stl", "model/3mf", "model/obj"]));
    expect(importFormatByName("Gear.STL")).toBe("stl");
    expect(stripImportExtension("Gear.3MF")).toBe("Gear");
    expect(stripImportExtension("notes.txt")).toBe("notes.txt");
    // IANA media types model/stl and model/3mf.
    expect(EXPORT_FORMAT_IDS.map((f) => EXPORT_FORMATS[f].mime)).toEqual(["model/3mf", "model/stl"]);
    expect(isExportFormat("stl")).toBe(true);
    expect(isExportFormat("obj")).toBe(false);
  });
});
