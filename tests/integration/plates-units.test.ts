import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { writeBinaryStl } from "@/lib/geometry/io/stl-write";
import { baseUrl } from "../support/http";
import { box } from "../support/meshes";

// Parts saved in metres or inches, posted to the plate API over HTTP (the started app and build worker).
const creds = JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as {
  apiKey: string;
};

/** A 20 × 20 × 3 mm token with its coordinates written in `perMm` units per mm (0.001: metres; 1/25.4: inches). */
const token = (perMm: number) => new Blob([new Uint8Array(writeBinaryStl([box(20 * perMm, 20 * perMm, 3 * perMm)]))]);

function post(part: Blob, fields: Record<string, string> = {}) {
  const f = new FormData();
  f.append("part", part, "token.stl");
  f.append("format", "json");
  f.append("options", JSON.stringify({ marks: { numbers: false, outlines: "none" } }));
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  return fetch(`${baseUrl()}/api/v1/plates`, { method: "POST", body: f, headers: { authorization: `Bearer ${creds.apiKey}` } });
}
type Finding = { severity: string; code: string; message: string };

describe("POST /api/v1/plates with parts in other units", () => {
  it.each([
    [0.001, "m", '0.020 mm across, read as millimetres: too small to print. Is it in metres? Send units: "m" for it (20.0 mm).'],
    [1 / 25.4, "in", '0.79 mm across, read as millimetres: too small to print. Is it in inches? Send units: "in" for it (20.0 mm).'],
  ])("refuses a token written at %s per mm with the fix, and builds it with units: %s", async (perMm, unit, fix) => {
    const refused = await post(token(perMm));
    expect(refused.status).toBe(422);
    const e = ((await refused.json()) as { error: { code: string; details: { findings: Finding[] } } }).error;
    expect(e.code).toBe("findings");
    expect(e.details.findings.find((f) => f.code === "part_too_small")?.message).toBe(`Part 1 (token.stl) is ${fix}`);
    // The plate keeps all its findings, the importer's named warning among them (the error lists only errors).
    const stored = await fetch(`${baseUrl()}/api/v1/plates/${refused.headers.get("x-plate-id")}`, {
      headers: { authorization: `Bearer ${creds.apiKey}` },
    });
    const findings = ((await stored.json()) as { findings: Finding[] }).findings;
    expect(
      findings.some((f) => f.code === "units_suspect" && f.severity === "warning" && f.message.startsWith("Part 1 (token.stl): ")),
    ).toBe(true);

    // The plain form and the JSON array form of the field.
    for (const units of [unit, JSON.stringify([unit])]) {
      const built = await post(token(perMm), { units });
      expect(built.status).toBe(200);
      const plate = (await built.json()) as { findings: Finding[]; pieces: { height: number }[] };
      expect(plate.findings.map((f) => f.code)).not.toContain("units_suspect");
      expect(plate.findings.map((f) => f.code)).not.toContain("contact_too_small");
      expect(plate.pieces[0]!.height).toBeCloseTo(3, 3); // the token read back at its real 3 mm
    }
  });

  it("422 invalid_units for a unit it does not know, or a list of the wrong length", async () => {
    for (const units of ["furlong", '["mm", "in"]']) {
      const r = await post(token(1), { units });
      expect(r.status).toBe(422);
      expect(((await r.json()) as { error: { code: string } }).error.code).toMatch(/^invalid/);
    }
  });
});
