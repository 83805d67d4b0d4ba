import { readFileSync } from "node:fs";
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { kits, plates, templates, users, workspaces } from "@/db/schema";
import { remakePlate } from "@/lib/plates/create";
import { permissionsOf } from "@/lib/auth/actor";
import { createTemplate, duplicateTemplate, renameTemplate, saveVersion } from "@/lib/templates/service";
import { baseUrl } from "../support/http";

// Templates through the plate API against the started app and worker: starters listed, values
// checked, version pinning byte for byte.
const creds = JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as {
  apiKey: string;
};
const auth = { authorization: `Bearer ${creds.apiKey}` };
let kitId: string;
let workspaceId: string;
let designerId: string;

beforeAll(async () => {
  const [ws] = await db().select().from(workspaces).where(eq(workspaces.slug, "marrowby"));
  workspaceId = ws!.id;
  const [k] = await db()
    .select()
    .from(kits)
    .where(and(eq(kits.workspaceId, ws!.id), eq(kits.name, "Harbour Run token set")));
  kitId = k!.id;
  const [u] = await db().select().from(users).where(eq(users.email, "dario@marrowby.example"));
  designerId = u!.id;
});

const designer = () => ({ workspaceId, userId: designerId, apiKeyId: null, permissions: permissionsOf("designer") });

const post = (fields: Record<string, string>) => {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) f.append(k, v);
  return fetch(`${baseUrl()}/api/v1/plates`, { method: "POST", body: f, headers: auth });
};
const errorOf = async (r: Response) => ((await r.json()) as { error: { code: string; message: string; details?: unknown } }).error;
const bytes = async (r: Response) => Buffer.from(await r.arrayBuffer());

async function fileOf(plateId: string, format: "stl" | "3mf"): Promise<Buffer> {
  for (let i = 0; i < 100; i++) {
    const [p] = await db().select().from(plates).where(eq(plates.id, plateId));
    if (p!.jobState === "done") break;
    if (p!.jobState === "failed") throw new Error(`plate failed: ${JSON.stringify(p!.error)}`);
    await new Promise((r) => setTimeout(r, 200));
  }
  const r = await fetch(`${baseUrl()}/api/v1/plates/${plateId}/file?format=${format}`, { headers: auth });
  expect(r.status).toBe(200);
  return bytes(r);
}

describe("GET /api/v1/templates", () => {
  it("lists the workspace's templates and the three starters, with versions, variables and placeholders", async () => {
    const r = await fetch(`${baseUrl()}/api/v1/templates`, { headers: auth });
    expect(r.status).toBe(200);
    const body = (await r.json()) as {
      templates: { id: string; name: string; starter: boolean; version: number; variables: { name: string }[]; placeholders: string[] }[];
    };
    const starters = body.templates
      .filter((t) => t.starter)
      .map((t) => t.name)
      .sort();
    expect(starters).toEqual(["Numbered set with outlines", "Order label with QR", "Round thank-you slab"]);
    const label = body.templates.find((t) => t.name === "Order label with QR")!;
    expect(label.variables.map((v) => v.name)).toEqual(["order", "customer"]);
    expect(label.placeholders).toEqual(["order", "customer"]);
    expect(body.templates.find((t) => t.name === "Marrowby thank-you")?.starter).toBe(false);
  });

  it("needs the templates:read scope", async () => {
    const r = await fetch(`${baseUrl()}/api/v1/templates`);
    expect(r.status).toBe(401);
  });
});

describe("plates from a template", () => {
  const starter = async (key: string) =>
    (
      await db()
        .select()
        .from(templates)
        .where(and(eq(templates.starterKey, key), isNull(templates.workspaceId)))
    )[0]!;

  it("missing, unknown and too-long values are 422s that name the variable or say by how much", async () => {
    const label = await starter("order-label");
    const missing = await post({ kit: kitId, template: label.id, format: "stl", variables: JSON.stringify({ customer: "Sam" }) });
    expect(missing.status).toBe(422);
    const m = await errorOf(missing);
    expect([m.code, m.details]).toEqual(["missing_variable", { variables: ["order"] }]);
    const extra = await post({
      kit: kitId,
      template: label.id,
      format: "stl",
      variables: JSON.stringify({ order: "1", customer: "Sam", cutomer: "typo" }),
    });
    expect(extra.status).toBe(422);
    expect((await errorOf(extra)).code).toBe("unknown_variable");
    // The order label's text lines may be at most 80 mm: a very long customer name does not fit, even
    // shrunk to the smallest cap height that prints.
    const long = await post({
      kit: kitId,
      template: label.id,
      format: "stl",
      variables: JSON.stringify({ order: "10482", customer: "Maximiliana Featherstonehaugh-Abernethy of Lower Marrowby" }),
    });
    expect(long.status).toBe(422);
    const l = await errorOf(long);
    expect(l.code).toBe("findings");
    expect(JSON.stringify(l.details)).toMatch(/Text line 2 .* \d+\.\d mm too long: even at .* its line allows 80 mm/);
    expect(JSON.stringify(l.details)).toContain('"field":["marks","text",1,"value"]');
    const missingTemplate = await post({ kit: kitId, template: "no-such-template", format: "stl" });
    expect(missingTemplate.status).toBe(404);
  });

  it("a plate made with version 1 is made again byte for byte after version 2 is saved", async () => {
    const actor = designer();
    const t = await createTemplate(actor, {
      name: `Pinning ${Date.now()}`,
      body: { options: { marks: { text: [{ value: "ORDER {order}" }] } }, variables: [{ name: "order", default: "", sample: "1" }] },
    });
    const v1 = await post({ kit: kitId, template: t.id, format: "stl", variables: JSON.stringify({ order: "20931" }) });
    expect(v1.status).toBe(200);
    const v1Bytes = await bytes(v1);
    const v1Plate = v1.headers.get("x-plate-id")!;
    const [row] = await db().select().from(plates).where(eq(plates.id, v1Plate));
    expect(row!.templateVersionId).toBe(t.versionId);
    expect(row!.variables).toMatchObject({
      order: "20931",
      date: expect.stringMatching(/^\d{4}-\d{2}-\d{2}$/),
      kit: "Harbour Run token set",
    });

    await saveVersion(actor, t.id, {
      body: {
        options: { slab: { shape: "disc" }, marks: { text: [{ value: "No. {order}", size: 6 }] } },
        variables: [{ name: "order", default: "", sample: "1" }],
      },
    });
    const v2 = await post({ kit: kitId, template: t.id, format: "stl", variables: JSON.stringify({ order: "20931" }) });
    expect(v2.status).toBe(200);
    expect((await bytes(v2)).equals(v1Bytes)).toBe(false); // the newest version is another slab

    const again = await remakePlate(designer(), v1Plate);
    expect((await fileOf(again.id, "stl")).equals(v1Bytes)).toBe(true);
    // 3MF too (dated by the plate's {date}, so remaking on another day gives the same bytes).
    expect((await fileOf(again.id, "3mf")).equals(await fileOf(v1Plate, "3mf"))).toBe(true);
    // And the API can ask for version 1 by number.
    const pinned = await post({
      kit: kitId,
      template: t.id,
      templateVersion: "1",
      format: "stl",
      variables: JSON.stringify({ order: "20931" }),
    });
    expect((await bytes(pinned)).equals(v1Bytes)).toBe(true);
    const noSuch = await post({
      kit: kitId,
      template: t.id,
      templateVersion: "9",
      format: "stl",
      variables: JSON.stringify({ order: "1" }),
    });
    expect(noSuch.status).toBe(404);
  });

  it("a template using an undefined variable cannot be saved", async () => {
    await expect(
      createTemplate(designer(), {
        name: "Broken",
        body: { options: { marks: { text: [{ value: "Hi {nmae}" }] } }, variables: [{ name: "name" }] },
      }),
    ).rejects.toThrow(/uses \{nmae\}, which is not defined/);
  });

  it("starter templates cannot be changed", async () => {
    const round = await starter("round-thanks");
    await expect(saveVersion(designer(), round.id, { body: { options: {}, variables: [] } })).rejects.toThrow(/duplicate it/);
  });

  it("a name is one template's per workspace, whatever its case: saving or renaming onto it is a 409 at the name field", async () => {
    const actor = designer();
    const body = { options: {}, variables: [] };
    const name = `Thank-you card ${Date.now()}`;
    const first = await createTemplate(actor, { name, body });
    const again = createTemplate(actor, { name: `  ${name.toUpperCase()} `, body });
    await expect(again).rejects.toMatchObject({ code: "template_name_taken", field: "name", status: 409 });
    await expect(again).rejects.toThrow(`A template called “${name.toUpperCase()}” already exists in this workspace`);
    // The refused save left nothing behind.
    const same = await db()
      .select()
      .from(templates)
      .where(and(eq(templates.workspaceId, workspaceId), sql`lower(${templates.name}) = lower(${name})`));
    expect(same.map((t) => t.id)).toEqual([first.id]);

    const other = await createTemplate(actor, { name: `${name} B`, body });
    await expect(renameTemplate(actor, other.id, name.toLowerCase(), "")).rejects.toMatchObject({
      code: "template_name_taken",
      status: 409,
    });
    await renameTemplate(actor, first.id, name.toLowerCase(), ""); // its own name in another case is no clash
    // Copies count on: "(copy)", then "(copy 2)".
    const c1 = await duplicateTemplate(actor, first.id);
    const c2 = await duplicateTemplate(actor, first.id);
    const copies = await db()
      .select({ id: templates.id, name: templates.name })
      .from(templates)
      .where(inArray(templates.id, [c1.id, c2.id]));
    expect(copies.map((c) => c.name).sort()).toEqual([`${name.toLowerCase()} (copy 2)`, `${name.toLowerCase()} (copy)`]);
  });
});
