import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { apiKeys, kits, plates, workspaces } from "@/db/schema";
import { generateApiKey } from "@/lib/auth/api-keys";
import { writeBinaryStl } from "@/lib/geometry/io/stl-write";
import { baseUrl, startHoldingReceiver, startReceiver } from "../../support/http";
import { box } from "../../support/meshes";

// Webhook callbacks over HTTP against the started app and build worker: the address guard at the API,
// and deliveries that run beside the builds, not inside them.
let key: string;
let kitId: string;

beforeAll(async () => {
  const [ws] = await db().select().from(workspaces).where(eq(workspaces.slug, "marrowby"));
  const [k] = await db().select().from(kits).where(eq(kits.workspaceId, ws!.id)).orderBy(kits.createdAt);
  kitId = k!.id;
  // A key of its own, so these requests do not count against the demo key's rate limit.
  const made = generateApiKey();
  await db()
    .insert(apiKeys)
    .values({
      workspaceId: ws!.id,
      name: "callbacks test",
      prefix: made.prefix,
      keyHash: made.hash,
      scopes: ["plates:write", "plates:read"],
    });
  key = made.key;
});

function form(fields: Record<string, string | Blob>) {
  const f = new FormData();
  for (const [k, v] of Object.entries(fields)) {
    if (v instanceof Blob) f.append(k, v, `${k}.stl`);
    else f.append(k, v);
  }
  return f;
}
const post = (body: FormData, headers: Record<string, string> = {}) =>
  fetch(`${baseUrl()}/api/v1/plates`, { method: "POST", body, headers: { authorization: `Bearer ${key}`, ...headers } });
const cube = (s = 10) => new Blob([new Uint8Array(writeBinaryStl([box(s, s, s)]))]);

async function jobStateOf(id: string) {
  const [p] = await db().select({ jobState: plates.jobState }).from(plates).where(eq(plates.id, id));
  return p?.jobState;
}

// SSRF through the callback URL. ASVS 4.0 V12.6.1 (the server calls only allowed destinations) and
// V5.2.6 (untrusted URLs checked against an allow-list of protocols and destinations).
// The test stack allow-lists the literal hosts 127.0.0.1 and localhost for its receivers, so the forms
// here are every other way of naming a loopback, private, metadata or special address.
describe("POST /api/v1/plates refuses callback URLs that reach inside (ASVS 4.0 V12.6.1, V5.2.6)", () => {
  const refused: [string, string][] = [
    ["http://[::ffff:7f00:1]/hook", "loopback"],
    ["http://[::ffff:127.0.0.1]/hook", "loopback"],
    ["http://[::]/hook", "unspecified"],
    ["http://[::1]/hook", "loopback"],
    ["http://[::127.0.0.1]/hook", "loopback"],
    ["http://[::ffff:a9fe:a9fe]/latest/meta-data/", "linkLocal"],
    ["http://[::ffff:10.0.0.1]/hook", "private"],
    ["http://[fe90::1]/hook", "linkLocal"],
    ["http://[fec0::1]/hook", "deprecatedSiteLocal"],
    ["http://[fd00::1]/hook", "uniqueLocal"],
    ["http://[64:ff9b::7f00:1]/hook", "loopback"],
    ["http://[2002:7f00:1::1]/hook", "loopback"],
    ["http://224.0.0.1/hook", "multicast"],
    ["http://255.255.255.255/hook", "broadcast"],
    ["http://198.18.0.1/hook", "reserved"],
    ["http://0.0.0.0:80/hook", "unspecified"],
    ["http://0x7f000002/hook", "loopback"],
    ["http://127.2/hook", "loopback"],
    ["http://169.254.169.254/latest/meta-data/", "linkLocal"],
    ["http://100.64.0.1/hook", "carrierGradeNat"],
    ["http://10.1.2.3/hook", "private"],
  ];
  it.each(refused)("%s → 422 invalid_callback (%s)", async (url, reason) => {
    const r = await post(form({ kit: kitId, callbackUrl: url }), { prefer: "respond-async" });
    expect(r.status).toBe(422);
    const { error } = (await r.json()) as { error: { code: string; message: string; details?: { reason?: string } } };
    expect(error.code).toBe("invalid_callback");
    expect(error.details?.reason).toBe(reason);
    expect(error.message).toMatch(/^callbackUrl: /);
  });

  it("422 for what is not an http(s) URL", async () => {
    for (const url of ["file:///etc/passwd", "gopher://127.0.0.1:25/", "not a url"]) {
      const r = await post(form({ kit: kitId, callbackUrl: url }));
      expect(r.status).toBe(422);
      expect(((await r.json()) as { error: { code: string } }).error.code).toBe("invalid_callback");
    }
  });
});

describe("a callback host that never answers holds no build slot", () => {
  let holder: Awaited<ReturnType<typeof startHoldingReceiver>>;
  let receiver: Awaited<ReturnType<typeof startReceiver>>;
  beforeAll(async () => {
    holder = await startHoldingReceiver();
    receiver = await startReceiver(204);
  });
  afterAll(async () => {
    await holder.close();
    await receiver.close();
  });

  it(
    "4 plates with a holding callback, then a normal plate: the normal one is built promptly, and the held deliveries are retried on " +
      "their schedule",
    { timeout: 60_000 },
    async () => {
      const held: string[] = [];
      for (let i = 0; i < 4; i++) {
        const r = await post(form({ part: cube(8 + i), callbackUrl: holder.url(`/hold/${i}`) }), { prefer: "respond-async" });
        expect(r.status).toBe(202);
        held.push(r.headers.get("x-plate-id")!);
      }
      // Every held plate's build ends and its delivery is under way (the receiver has the request).
      await expect.poll(() => holder.held.length, { timeout: 20_000, interval: 100 }).toBeGreaterThanOrEqual(4);
      const t0 = Date.now();
      const r = await post(form({ part: cube(12), callbackUrl: receiver.url("/normal") }), { prefer: "respond-async" });
      expect(r.status).toBe(202);
      const normal = r.headers.get("x-plate-id")!;
      await expect.poll(() => jobStateOf(normal), { timeout: 10_000, interval: 100 }).toBe("done");
      const builtIn = Date.now() - t0;
      console.log(`[callbacks] normal plate built ${builtIn} ms after it was posted, with 4 deliveries held`);
      // Its own callback is not stuck behind the held ones either.
      await expect.poll(() => receiver.received.filter((x) => x.body.includes(normal)).length, { timeout: 10_000, interval: 100 }).toBe(1);
      for (const id of held) expect(await jobStateOf(id)).toBe("done");

      // The held deliveries are retried: a second attempt on the same path after at least one attempt's timeout.
      const timeoutMs = Number(process.env.SLAB_CALLBACK_TIMEOUT_MS ?? 10_000);
      await expect
        .poll(() => holder.held.filter((h) => h.path === "/hold/0").length, { timeout: 40_000, interval: 200 })
        .toBeGreaterThanOrEqual(2);
      const [a1, a2] = holder.held.filter((h) => h.path === "/hold/0");
      expect(a2!.at - a1!.at).toBeGreaterThanOrEqual(timeoutMs - 100);
      console.log(`[callbacks] /hold/0 attempts ${a2!.at - a1!.at} ms apart (attempt timeout ${timeoutMs} ms)`);
      // The queue's record of it: its own queue, 5 retries with backoff.
      const rows = await db().execute<{ retry_limit: number; retry_backoff: boolean; retry_count: number; state: string }>(
        sql`select retry_limit, retry_backoff, retry_count, state from pgboss.job where name = 'plate-callback' and data->>'url' = 
          ${holder.url("/hold/0")}`,
      );
      expect(rows.rows).toHaveLength(1);
      expect(rows.rows[0]).toMatchObject({ retry_limit: 5, retry_backoff: true });
      expect(rows.rows[0]!.retry_count).toBeGreaterThanOrEqual(1);
    },
  );
});
