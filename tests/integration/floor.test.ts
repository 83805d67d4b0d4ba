import { execFileSync } from "node:child_process";
import { permissionsOf, systemActor } from "@/lib/auth/actor";
import { createHmac } from "node:crypto";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { and, desc, eq, sql } from "drizzle-orm";
import jsQR from "jsqr";
import { PNG } from "pngjs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { devOutbox, inspections, kits, plates, users, workspaces } from "@/db/schema";
import { firstPassYield, makeReprint, piecesOf, recordInspection } from "@/lib/floor/service";
import { baseUrl, startReceiver, type Received } from "../support/http";

// The print floor against the started app and worker: the plate map PDF read back by pdf.js and its
// QR code decoded from a raster made by poppler's pdftoppm; an inspection with a missing piece; yield.
const creds = JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as {
  apiKey: string;
};
const auth = { authorization: `Bearer ${creds.apiKey}` };
let kitId: string, workspaceId: string, designerId: string, operatorId: string;

beforeAll(async () => {
  const [ws] = await db().select().from(workspaces).where(eq(workspaces.slug, "marrowby"));
  workspaceId = ws!.id;
  const [k] = await db()
    .select()
    .from(kits)
    .where(and(eq(kits.workspaceId, ws!.id), eq(kits.name, "Harbour Run token set")));
  kitId = k!.id;
  designerId = (await db().select().from(users).where(eq(users.email, "dario@marrowby.example")))[0]!.id;
  operatorId = (await db().select().from(users).where(eq(users.email, "opal@marrowby.example")))[0]!.id;
});

async function makePlate(extra: Record<string, string> = {}): Promise<string> {
  const f = new FormData();
  f.append("kit", kitId);
  f.append("format", "json");
  for (const [k, v] of Object.entries(extra)) f.append(k, v);
  const r = await fetch(`${baseUrl()}/api/v1/plates`, { method: "POST", body: f, headers: auth });
  expect(r.status).toBe(200);
  return ((await r.json()) as { plate: { id: string } }).plate.id;
}

async function pdfText(bytes: Uint8Array) {
  const pdfjs = await import("pdfjs-dist/legacy/build/pdf.mjs");
  const doc = await pdfjs.getDocument({ data: bytes, useSystemFonts: false, isEvalSupported: false }).promise;
  const pages: string[][] = [];
  for (let i = 1; i <= doc.numPages; i++) {
    const page = await doc.getPage(i);
    const c = await page.getTextContent();
    pages.push(c.items.map((it) => ("str" in it ? it.str : "")));
  }
  const first = await doc.getPage(1);
  return { pages, size: first.view };
}

describe("the plate map sheet", () => {
  let plateId: string;
  beforeAll(async () => {
    plateId = await makePlate();
  });

  it("is one PDF page per map, A4 or Letter, with a table row for every piece and the cautions", async () => {
    const r = await fetch(`${baseUrl()}/api/v1/plates/${plateId}/map.pdf`, { headers: auth });
    expect(r.status).toBe(200);
    expect(r.headers.get("content-type")).toBe("application/pdf");
    const a4 = await pdfText(new Uint8Array(await r.arrayBuffer()));
    expect(a4.pages).toHaveLength(1);
    expect(a4.size[2]).toBeCloseTo((210 / 25.4) * 72, 0); // ISO 216: A4 is 210 × 297 mm
    expect(a4.size[3]).toBeCloseTo((297 / 25.4) * 72, 0);
    const words = a4.pages[0]!;
    // The demo kit: 4 harbour tiles and 2 beacon pawns, each a row of the table.
    expect(words.filter((w) => w === "Harbour tile")).toHaveLength(4);
    expect(words.filter((w) => w === "Beacon pawn")).toHaveLength(2);
    for (const n of [1, 2, 3, 4, 5, 6]) expect(words).toContain(String(n));
    const all = words.join(" ");
    expect(all).toMatch(/layer height 0\.2 mm/);
    expect(all).toMatch(/Keep that air gap in the slicer/);
    expect(all).toMatch(/Hot nozzle/);
    expect(all).toMatch(/Scale 1:1/);
    const letter = await fetch(`${baseUrl()}/api/v1/plates/${plateId}/map.pdf?paper=letter`, { headers: auth });
    const l = await pdfText(new Uint8Array(await letter.arrayBuffer()));
    expect([l.size[2], l.size[3]]).toEqual([expect.closeTo(612, 0), expect.closeTo(792, 0)]); // US Letter, 8.5 × 11 in
    const a3 = await pdfText(
      new Uint8Array(await (await fetch(`${baseUrl()}/api/v1/plates/${plateId}/map.pdf?paper=a3`, { headers: auth })).arrayBuffer()),
    );
    expect([a3.size[2], a3.size[3]]).toEqual([expect.closeTo((297 / 25.4) * 72, 0), expect.closeTo((420 / 25.4) * 72, 0)]); // ISO 216 A3
    expect((await fetch(`${baseUrl()}/api/v1/plates/${plateId}/map.pdf?paper=b5`, { headers: auth })).status).toBe(400);
    expect((await fetch(`${baseUrl()}/api/v1/plates/${plateId}/map.pdf`)).status).toBe(401);
  });

  it("carries its own QR code, which decodes (jsQR, from poppler's raster) to the plate's page in the app", async () => {
    const pdf = new Uint8Array(await (await fetch(`${baseUrl()}/api/v1/plates/${plateId}/map.pdf`, { headers: auth })).arrayBuffer());
    const dir = mkdtempSync(path.join(tmpdir(), "sheet-"));
    try {
      writeFileSync(path.join(dir, "map.pdf"), pdf);
      execFileSync("pdftoppm", ["-r", "150", "-png", "-singlefile", path.join(dir, "map.pdf"), path.join(dir, "map")]);
      const png = PNG.sync.read(readFileSync(path.join(dir, "map.png")));
      const code = jsQR(new Uint8ClampedArray(png.data.buffer, png.data.byteOffset, png.data.byteLength), png.width, png.height);
      expect(code?.data).toBe(`${baseUrl()}/floor/plates/${plateId}`);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe("inspection", () => {
  let receiver: Awaited<ReturnType<typeof startReceiver>>;
  let received: Received[];
  beforeAll(async () => {
    receiver = await startReceiver(200);
    received = receiver.received;
  });
  afterAll(() => receiver.close());

  it("one missing piece: the status follows, the maker is told, the callback is signed, the reprint holds only that piece", async () => {
    const id = await makePlate({ callbackUrl: receiver.url("/slab-events") });
    await db().update(plates).set({ createdBy: designerId }).where(eq(plates.id, id)); // made by the demo designer
    const [p] = await db().select().from(plates).where(eq(plates.id, id));
    expect(p!.floorState).toBe("to_print");
    const piece3 = piecesOf(p!).find((x) => x.number === 3)!;
    received.length = 0;

    const r = await recordInspection({ workspaceId, userId: operatorId, apiKeyId: null, permissions: permissionsOf("operator") }, id, [
      { number: 3, state: "missing" },
    ]);
    expect(r.to).toBe("reprint_needed");
    const [after] = await db().select().from(plates).where(eq(plates.id, id));
    expect(after!.floorState).toBe("reprint_needed");
    const [insp] = await db().select().from(inspections).where(eq(inspections.plateId, id));
    expect([insp!.first, insp!.missing, insp!.defective, insp!.byUserId]).toEqual([true, 1, 0, operatorId]);
    expect(insp!.results).toHaveLength(6);

    // The maker's mail, caught by the fake SMTP server.
    await expect
      .poll(
        async () =>
          (
            await db()
              .select()
              .from(devOutbox)
              .where(sql`${devOutbox.toAddresses} like ${"%dario@marrowby.example%"}`)
              .orderBy(desc(devOutbox.receivedAt))
              .limit(1)
          )[0]?.subject ?? "",
        { timeout: 10_000 },
      )
      .toMatch(/1 piece to reprint/);
    // The signed inspection event (HMAC-SHA256 of "<t>.<body>", RFC 2104, checked independently).
    await expect.poll(() => received.filter((x) => x.body.includes('"inspection"')).length, { timeout: 10_000 }).toBe(1);
    const ev = received.find((x) => x.body.includes('"inspection"'))!;
    const m = /^t=(\d+),v1=([0-9a-f]{64})$/.exec(String(ev.headers["slabwright-signature"]))!;
    const [ws] = await db().select().from(workspaces).where(eq(workspaces.id, workspaceId));
    expect(createHmac("sha256", ws!.webhookSecret!).update(`${m[1]}.${ev.body}`).digest("hex")).toBe(m[2]);
    expect(JSON.parse(ev.body)).toMatchObject({ event: "inspection", plate: { id }, pieces: [{ number: 3, state: "missing" }] });

    const reprint = await makeReprint({ workspaceId, userId: operatorId, apiKeyId: null, permissions: permissionsOf("operator") }, id);
    expect([reprint.reprintOf, reprint.source, reprint.pieceCount, reprint.templateVersionId]).toEqual([
      id,
      "reprint",
      1,
      p!.templateVersionId,
    ]);
    for (let i = 0; i < 100; i++) {
      const [x] = await db().select().from(plates).where(eq(plates.id, reprint.id));
      if (x!.jobState === "done" || x!.jobState === "failed") break;
      await new Promise((res) => setTimeout(res, 200));
    }
    const [built] = await db().select().from(plates).where(eq(plates.id, reprint.id));
    expect(built!.jobState).toBe("done");
    const pieces = piecesOf(built!);
    expect(pieces).toHaveLength(1);
    expect(pieces[0]!.partName).toBe(piece3.partName);
    // The reprinted piece keeps its number, so it goes back to its own outline on the packed kit.
    expect(pieces[0]!.number).toBe(3);
    expect(built!.variables).toEqual(p!.variables);
  });

  it("a defective piece needs a note; a piece the plate does not have is refused", async () => {
    const id = await makePlate();
    await expect(
      recordInspection({ workspaceId, userId: operatorId, apiKeyId: null, permissions: permissionsOf("operator") }, id, [
        { number: 2, state: "defective" },
      ]),
    ).rejects.toThrow(/Say what is wrong with piece 2/);
    await expect(
      recordInspection({ workspaceId, userId: operatorId, apiKeyId: null, permissions: permissionsOf("operator") }, id, [
        { number: 99, state: "missing" },
      ]),
    ).rejects.toThrow(/no piece 99/);
    const ok = await recordInspection(
      { workspaceId, userId: operatorId, apiKeyId: null, permissions: permissionsOf("operator") },
      id,
      "all-present",
    );
    expect(ok.to).toBe("done");
  });
});

describe("first-pass yield", () => {
  it("counts only each plate's first inspection: 3 of 5 first inspections complete → 60 %; per kit apart", async () => {
    // A workspace of its own so the count is exactly this seeded history.
    const [ws] = await db()
      .insert(workspaces)
      .values({ name: "Yield test", slug: `yield-${Date.now()}` })
      .returning();
    const [kitA] = await db().insert(kits).values({ workspaceId: ws!.id, name: "Kit A" }).returning();
    const [kitB] = await db().insert(kits).values({ workspaceId: ws!.id, name: "Kit B" }).returning();
    const seed = async (kit: string, first: [number, number], second?: [number, number]) => {
      const [p] = await db()
        .insert(plates)
        .values({ workspaceId: ws!.id, kitId: kit, source: "api", options: {}, status: "ready", jobState: "done", floorState: "done" })
        .returning();
      const at = new Date("2026-11-16T10:00:00Z");
      await db()
        .insert(inspections)
        .values({ workspaceId: ws!.id, plateId: p!.id, results: [], first: true, missing: first[0], defective: first[1], at });
      if (second)
        await db()
          .insert(inspections)
          .values({
            workspaceId: ws!.id,
            plateId: p!.id,
            results: [],
            first: false,
            missing: second[0],
            defective: second[1],
            at: new Date("2026-11-24T10:00:00Z"),
          });
    };
    await seed(kitA!.id, [0, 0]);
    await seed(kitA!.id, [0, 0]);
    await seed(kitA!.id, [1, 0], [0, 0]); // failed first, fine after the reprint: still a first-pass failure
    await seed(kitB!.id, [0, 0]);
    await seed(kitB!.id, [0, 2]);
    const all = await firstPassYield(systemActor(ws!.id));
    expect([all.inspected, all.passed, all.yield]).toEqual([5, 3, 0.6]);
    expect(all.weeks).toEqual([{ week: "2026-11-16", inspected: 5, passed: 3 }]); // ISO weeks start on Monday
    const a = await firstPassYield(systemActor(ws!.id), kitA!.id);
    expect([a.inspected, a.passed]).toEqual([3, 2]);
    const b = await firstPassYield(systemActor(ws!.id), kitB!.id);
    expect(b.yield).toBe(0.5);
    await db().delete(workspaces).where(eq(workspaces.id, ws!.id));
  });
});
