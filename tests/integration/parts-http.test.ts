import { createHash } from "node:crypto";
import { existsSync, readFileSync } from "node:fs";
import http from "node:http";
import path from "node:path";
import { eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { parts } from "@/db/schema";
import { writeBinaryStl } from "@/lib/geometry/io/stl-write";
import { box } from "../support/meshes";
import { baseUrl, demoUser, signInOverHttp, type HttpSession } from "../support/http";
import { settled, uploadPart } from "../support/uploads";

// Over HTTP against the app npm test started (built, on the test port, test database).
let designer: HttpSession;
let viewer: HttpSession;
const made: string[] = [];
const tag = Date.now().toString(36);
const MODELS = path.join(process.cwd(), "node_modules", "stl-models");

beforeAll(async () => {
  designer = await signInOverHttp(demoUser("designer").email, demoUser("designer").password);
  viewer = await signInOverHttp(demoUser("viewer").email, demoUser("viewer").password);
});

afterAll(async () => {
  if (made.length) await db().delete(parts).where(inArray(parts.id, made));
});

const upload = (s: HttpSession, name: string, body: Uint8Array, query = "") =>
  s.fetch(`/api/parts?name=${encodeURIComponent(name)}${query}`, {
    method: "POST",
    body: new Uint8Array(body),
    headers: { "content-type": "application/octet-stream" },
  });

const blobPath = (bytes: Uint8Array) => {
  const key = createHash("sha256").update(bytes).digest("hex");
  return path.join(process.cwd(), ".data", "blobs", key.slice(0, 2), key.slice(2, 4), key);
};

describe("uploading parts", () => {
  it("a batch with one broken file stores the good ones and names the broken one's problem", async () => {
    const gear = new Uint8Array(readFileSync(path.join(MODELS, "objects/gearwheel.bin.stl")));
    // The stl-models package's tetrahedron with a face missing, made unique to this run.
    const broken = new TextEncoder().encode(
      readFileSync(path.join(MODELS, "broken/missingFace.ascii.stl"), "utf8").replace("solid tetrahedron", `solid tetrahedron-${tag}`),
    );
    const blocks = writeBinaryStl([box(10, 10, 10), box(8, 8, 5, [20, 0, 0]), box(6, 12, 4, [0, 20, 0])]);

    // Each upload is answered at once (202, checking); a build worker imports it, never the web process.
    const sent = await upload(designer, `gear-${tag}.stl`, gear);
    expect(sent.status).toBe(202);
    expect(sent.headers.get("location")).toMatch(/^\/api\/parts\/uploads\//);
    const a = await settled(designer, sent);
    expect(a.state).toBe("ready");
    const b = await uploadPart(designer, `broken-${tag}.stl`, broken);
    expect(b.state).toBe("refused");
    expect(b.error).toMatchObject({ code: "open_mesh", details: { file: `broken-${tag}.stl`, openEdges: 3 } });
    expect(b.error!.message).toContain("3 open edges");
    const c = await uploadPart(designer, `blocks-${tag}.stl`, blocks);
    expect(c.state).toBe("ready");
    expect(c.parts).toEqual([expect.objectContaining({ bodies: 3 })]);
    made.push(...a.parts!.map((p) => p.id), c.parts![0]!.id);

    // The refused file left no row and no stored bytes.
    const rows = await db()
      .select()
      .from(parts)
      .where(eq(parts.name, `broken-${tag}`));
    expect(rows).toEqual([]);
    expect(existsSync(blobPath(broken))).toBe(false);
    expect(existsSync(blobPath(gear))).toBe(true);

    // The library lists the good ones, searchable, with measurements and a thumbnail.
    const list = (await (await designer.fetch(`/api/parts?search=${tag}&sort=name&dir=asc`)).json()) as {
      rows: { name: string; triangles: number; contactArea: number; thumbnail: string }[];
      total: number;
    };
    expect(list.rows.map((r) => r.name)).toEqual([`blocks-${tag}`, `gear-${tag}`]);
    expect(list.rows[1]!.triangles).toBe(2444);
    expect(list.rows[1]!.contactArea).toBeGreaterThan(100);
    const thumb = await designer.fetch(list.rows[0]!.thumbnail);
    expect(thumb.headers.get("content-type")).toBe("image/svg+xml");
    expect(await thumb.text()).toMatch(/^<svg /);
  });

  it("splits a 3-body STL into three parts, replacing the original", async () => {
    const blocks = writeBinaryStl([box(10, 10, 10, [0, 0, 0]), box(9, 9, 5, [20, 0, 0]), box(6, 12, 4, [0, 20, 0])]);
    const up = await uploadPart(designer, `trio-${tag}.stl`, blocks);
    const id = up.parts![0]!.id;
    // The web process never reads a mesh (ASVS 4.0 V12.1.1 resource limits): the split is a worker's job.
    const res = await designer.fetch(`/api/parts/${id}/split`, { method: "POST" });
    expect(res.status).toBe(202);
    const done = await settled(designer, res);
    expect(done.state).toBe("ready");
    const split = { parts: done.parts! };
    expect(split.parts.map((p) => p.name)).toEqual([`trio-${tag} 1`, `trio-${tag} 2`, `trio-${tag} 3`]);
    expect(split.parts.every((p) => p.bodies === 1 && p.triangles === 12)).toBe(true);
    made.push(...split.parts.map((p) => p.id));
    expect((await designer.fetch(`/api/parts/${id}`)).status).toBe(404);
    const vols = await db()
      .select({ v: parts.volume })
      .from(parts)
      .where(
        inArray(
          parts.id,
          split.parts.map((p) => p.id),
        ),
      );
    expect(vols.map((r) => Math.round(r.v)).sort((x, y) => x - y)).toEqual([288, 405, 1000]);
  });

  it("refuses a declared over-limit body with 413 before reading any of it", async () => {
    const url = new URL(`${baseUrl()}/api/parts?name=huge.stl`);
    const status = await new Promise<number>((resolve, reject) => {
      const req = http.request(
        {
          host: url.hostname,
          port: url.port,
          path: `${url.pathname}${url.search}`,
          method: "POST",
          headers: { "content-length": String(300 * 1024 * 1024), "content-type": "application/octet-stream", cookie: designer.cookie() },
        },
        (res) => {
          resolve(res.statusCode ?? 0);
          req.destroy();
        },
      );
      req.on("error", reject);
      req.flushHeaders(); // headers only: not a byte of the 300 MB is sent
    });
    expect(status).toBe(413);
  });

  it("cuts off a streamed body the moment it passes the limit (413), long before the end", async () => {
    let pulled = 0;
    const total = 80 * 1024 * 1024; // the test server's limit is 20 MB
    const chunk = new Uint8Array(1024 * 1024);
    const body = new ReadableStream<Uint8Array>({
      pull(ctrl) {
        if (pulled >= total) return ctrl.close();
        pulled += chunk.byteLength;
        ctrl.enqueue(chunk);
      },
    });
    const res = await designer.fetch("/api/parts?name=endless.stl", { method: "POST", body, duplex: "half" } as RequestInit);
    expect(res.status).toBe(413);
    expect(((await res.json()) as { error: { code: string } }).error.code).toBe("file_too_large");
    expect(pulled).toBeLessThan(total);
  });

  it("sniffs the content: a text file named .stl is not a mesh (415); the name needs no extension", async () => {
    const res = await upload(designer, `notes-${tag}.stl`, new TextEncoder().encode("these are my notes about the kit\n"));
    expect([415, 422]).toContain(res.status);
    const obj = new TextEncoder().encode("v 0 0 0\nv 9 0 0\nv 0 9 0\nv 0 0 9\nf 1 3 2\nf 1 2 4\nf 2 3 4\nf 1 4 3\n");
    const ok = await uploadPart(designer, `tetra-${tag}`, obj);
    expect(ok.state).toBe("ready");
    made.push(...ok.parts!.map((p) => p.id));
  });

  it("offers the unit fix: a part measured in inches becomes millimetres in one request", async () => {
    const tiny = writeBinaryStl([box(0.5, 0.5, 0.25)]);
    const up = await uploadPart(designer, `inchy-${tag}.stl`, tiny);
    const p = up.parts![0]!;
    made.push(p.id);
    expect(p.warnings[0]).toMatchObject({ code: "units_suspect", suggestion: { unit: "inch" } });
    const patch = (body: unknown) =>
      designer.fetch(`/api/parts/${p.id}`, {
        method: "PATCH",
        body: JSON.stringify(body),
        headers: { "content-type": "application/json" },
      });
    const part = async () =>
      (
        (await (await designer.fetch(`/api/parts/${p.id}`)).json()) as {
          part: { sizeX: number; sizeZ: number; layFlat: boolean; unit: string; warnings: unknown[] };
        }
      ).part;
    // Reading in another unit re-reads the mesh: queued for a worker (202), the same part id afterwards.
    const fixing = await patch({ unit: "inch" });
    expect(fixing.status).toBe(202);
    expect((await settled(designer, fixing)).parts!.map((x) => x.id)).toEqual([p.id]);
    const fixed = await part();
    expect(fixed.sizeX).toBeCloseTo(12.7, 3); // 1 in = 25.4 mm
    expect(fixed.sizeZ).toBeCloseTo(6.35, 3);
    expect(fixed.warnings).toEqual([]);
    expect((await settled(designer, await patch({ layFlat: true }))).state).toBe("ready");
    const flat = await part();
    expect(flat.layFlat).toBe(true);
    expect(flat.sizeZ).toBeCloseTo(6.35, 3); // already lying on its largest face
    // A rename alone needs no worker: answered at once.
    const renamed = await patch({ name: `inchy-renamed-${tag}` });
    expect(renamed.status).toBe(200);
    expect(((await renamed.json()) as { part: { name: string; unit: string } }).part).toMatchObject({
      name: `inchy-renamed-${tag}`,
      unit: "inch",
    });
  });

  it("refuses a viewer's upload (403) and a signed-out one (401)", async () => {
    const cube = writeBinaryStl([box(5, 5, 5)]);
    expect((await upload(viewer, `v-${tag}.stl`, cube)).status).toBe(403);
    expect((await fetch(`${baseUrl()}/api/parts?name=x.stl`, { method: "POST", body: new Uint8Array(cube) })).status).toBe(401);
  });
});

describe("deleting parts", () => {
  it("is refused while a kit uses the part, naming the kit", async () => {
    const list = (await (await designer.fetch("/api/parts?search=Harbour%20tile")).json()) as { rows: { id: string }[] };
    const res = await designer.fetch(`/api/parts/${list.rows[0]!.id}`, { method: "DELETE" });
    expect(res.status).toBe(409);
    const body = (await res.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe("part_in_use");
    expect(body.error.message).toContain("Harbour Run token set");
  });

  it("removes an unused part, and another workspace's part is not found", async () => {
    const up = await uploadPart(designer, `gone-${tag}.stl`, writeBinaryStl([box(7, 7, 7)]));
    const id = up.parts![0]!.id;
    expect((await viewer.fetch(`/api/parts/${id}`, { method: "DELETE" })).status).toBe(403);
    expect((await designer.fetch(`/api/parts/${id}`, { method: "DELETE" })).status).toBe(204);
    expect((await designer.fetch(`/api/parts/${id}`)).status).toBe(404);
    expect((await designer.fetch(`/api/parts/00000000-0000-0000-0000-000000000000`, { method: "DELETE" })).status).toBe(404);
  });
});
