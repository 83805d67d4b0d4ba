import { readFileSync } from "node:fs";
import { eq, inArray } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { db } from "@/db";
import { kitParts, kits, partPreparations, parts, workspaces } from "@/db/schema";
import { decodePrepared } from "@/lib/geometry/prepared";
import { preparedSource } from "@/lib/parts/prepared-source";
import { blobStore } from "@/lib/storage";
import { baseUrl } from "../support/http";

// A part is read and measured once: the build thread that first meets it keeps its welded mesh and
// measures in the blob store (lib/geometry/prepared.ts), found by its content key and reading.
const creds = JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as {
  apiKey: string;
};
const auth = { authorization: `Bearer ${creds.apiKey}` };

describe("parts measured once", () => {
  it("after a plate of the demo kit, each of its parts has a kept preparation that reads back at the plate's layer height", async () => {
    const [ws] = await db().select().from(workspaces).where(eq(workspaces.slug, "marrowby"));
    const [kit] = await db().select().from(kits).where(eq(kits.workspaceId, ws!.id)).orderBy(kits.createdAt);
    const f = new FormData();
    f.append("kit", kit!.id);
    f.append("format", "json");
    f.append("options", JSON.stringify({ layerHeight: 0.16, slab: { gap: 0.32 } }));
    const r = await fetch(`${baseUrl()}/api/v1/plates`, { method: "POST", body: f, headers: auth });
    expect(r.status).toBe(200);
    const lines = await db()
      .select({
        blobKey: parts.blobKey,
        unit: parts.unit,
        layFlat: parts.layFlat,
        orientation: kitParts.orientation,
        rotation: kitParts.rotation,
      })
      .from(kitParts)
      .innerJoin(parts, eq(parts.id, kitParts.partId))
      .where(eq(kitParts.kitId, kit!.id));
    const rows = await db()
      .select()
      .from(partPreparations)
      .where(
        inArray(
          partPreparations.partBlobKey,
          lines.map((l) => l.blobKey),
        ),
      );
    expect(rows.length).toBeGreaterThanOrEqual(new Set(lines.map((l) => l.blobKey)).size);
    for (const row of rows) {
      expect(row.layerHeights).toContain(0.16);
      const prepared = decodePrepared(await blobStore().get(row.blobKey));
      expect(prepared.mesh.triVerts.length % 3).toBe(0);
      expect([...prepared.measures.keys()]).toContain(0.16);
      expect(prepared.measures.get(0.16)!.volume).toBeGreaterThan(0);
      // Found by the part's own blob: the source is the SHA-256 of the engine's version, the blob and the reading.
      expect(row.source).toMatch(/^[0-9a-f]{64}$/);
    }
    expect(rows.every((row) => row.source !== preparedSource({ blobKey: row.partBlobKey, unit: "parsecs" }))).toBe(true);
  });
});
