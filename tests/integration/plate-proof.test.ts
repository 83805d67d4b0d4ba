import { createHash } from "node:crypto";
import { readFileSync } from "node:fs";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { kits, plateFiles, plates, workspaces } from "@/db/schema";
import { baseUrl } from "../support/http";

// Every plate the worker stores is proven from its exported files (lib/proof); a plate whose files are
// tampered with between the build and the proof is failed with proof_failed and never stored as ready.
const creds = JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as {
  apiKey: string;
};
const auth = { authorization: `Bearer ${creds.apiKey}` };
let kitId: string;

beforeAll(async () => {
  const [ws] = await db().select().from(workspaces).where(eq(workspaces.slug, "marrowby"));
  const [k] = await db().select().from(kits).where(eq(kits.workspaceId, ws!.id)).orderBy(kits.createdAt);
  kitId = k!.id;
});

function form(fields: Record<string, string>) {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  return f;
}
const post = (fields: Record<string, string>) => fetch(`${baseUrl()}/api/v1/plates`, { method: "POST", body: form(fields), headers: auth });

describe("the proof of every plate", () => {
  it("a normal plate carries its proof, ok, in GET /api/v1/plates/{id}", async () => {
    const r = await post({
      kit: kitId,
      format: "json",
      options: JSON.stringify({ marks: { qr: { value: "https://example.com/o/{order}" } } }),
      variables: JSON.stringify({ order: "10482" }),
    });
    expect(r.status).toBe(200);
    const id = r.headers.get("x-plate-id")!;
    const g = await fetch(`${baseUrl()}/api/v1/plates/${id}`, { headers: auth });
    const body = (await g.json()) as {
      plate: { status: string };
      proof: {
        ok: boolean;
        summary: string;
        figures: { bodies: number; qrText: string; openEdges: number };
        rules: { rule: string; pass: boolean }[];
      };
    };
    expect(body.plate.status).toBe("ready");
    expect(body.proof.ok).toBe(true);
    expect(body.proof.figures).toMatchObject({ bodies: 7, openEdges: 0, qrText: "https://example.com/o/10482" });
    expect(body.proof.rules.map((x) => x.rule)).toEqual([
      "stl",
      "closed",
      "oriented",
      "volume",
      "bodies",
      "on_slab",
      "apart",
      "gap",
      "floor",
      "qr",
      "three_mf",
    ]);
    expect(body.proof.summary).toBe("Checked: closed, 7 bodies, every piece on the slab, QR reads back, 3MF matches");
    // Its files are listed one row per format, with the length and SHA-256 of what is served
    // (the digest recomputed here with node:crypto, FIPS 180-4), the digest also its ETag.
    const rows = await db().select().from(plateFiles).where(eq(plateFiles.plateId, id));
    expect(rows.map((f) => f.format).sort()).toEqual(["3mf", "stl"]);
    for (const f of rows) {
      const file = await fetch(`${baseUrl()}/api/v1/plates/${id}/file?format=${f.format}`, { headers: auth });
      expect(file.status).toBe(200);
      const bytes = new Uint8Array(await file.arrayBuffer());
      expect(bytes.byteLength).toBe(f.bytes);
      expect(createHash("sha256").update(bytes).digest("hex")).toBe(f.sha256);
      expect(file.headers.get("etag")).toBe(`"${f.sha256}"`);
    }
  });

  it("a plate whose STL is tampered with between build and proof fails with proof_failed and is never ready", async () => {
    // The worker turns a triangle over only under NODE_ENV=test (see tamperForTest in build-thread.ts).
    const r = await post({ kit: kitId, format: "json", variables: JSON.stringify({ proof_tamper: "turn-triangle" }) });
    expect(r.status).toBe(422);
    const e = (
      (await r.json()) as {
        error: { code: string; message: string; details: { plate: { id: string }; details: { rule: string; figure: number } } };
      }
    ).error;
    expect(e.code).toBe("proof_failed");
    expect(e.details.details).toMatchObject({ rule: "oriented", figure: 3 });
    expect(e.message).toMatch(
      /failed their proof \(oriented\): 3 edges run the same way in both their triangles: a triangle is turned over \(first at x [\d.]+, y [\d.]+ mm, z [\d.]+ mm\)\./,
    );
    const [row] = await db()
      .select()
      .from(plates)
      .where(eq(plates.id, r.headers.get("x-plate-id")!));
    expect(row!.status).toBe("failed");
    expect(row!.jobState).toBe("failed");
    expect(await db().select().from(plateFiles).where(eq(plateFiles.plateId, row!.id))).toEqual([]);
    expect(row!.proof).toMatchObject({ ok: false, failed: "oriented" });
    const file = await fetch(`${baseUrl()}/api/v1/plates/${row!.id}/file?format=stl`, { headers: auth });
    expect(file.status).toBe(409);
  });
});
