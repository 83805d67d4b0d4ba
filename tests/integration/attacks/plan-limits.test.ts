import { and, count, eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { kits, plates, plateUsage, workspaceBilling, workspaces } from "@/db/schema";
import { callAction } from "../../support/actions";
import { demoUser, signInOverHttp } from "../../support/http";

// The Bench plan's "no logos" holds on every path that makes a plate: the limit lives in the one
// place every path goes through (meterPlate), so the editor cannot get round it.
// ASVS 4.0 V4.1.2 (access control enforced server side), V11.1.2 (business limits enforced).

const LOGO = { name: "mark", paths: [{ d: "M0 0 L10 0 L10 10 L0 10 Z" }], box: { minX: 0, minY: 0, maxX: 10, maxY: 10 }, width: 12 };
let demo: string;
let plan: string;

beforeAll(async () => {
  const [ws] = await db().select().from(workspaces).where(eq(workspaces.slug, "marrowby"));
  demo = ws!.id;
  const [b] = await db().select().from(workspaceBilling).where(eq(workspaceBilling.workspaceId, demo));
  plan = b?.plan ?? "workshop";
  await db().update(workspaceBilling).set({ plan: "bench" }).where(eq(workspaceBilling.workspaceId, demo));
  // Room in the Bench quota, so the only refusal left to meet is the logo's.
  await db().delete(plateUsage).where(eq(plateUsage.workspaceId, demo));
});
afterAll(async () => {
  await db()
    .update(workspaceBilling)
    .set({ plan: plan as "bench" })
    .where(eq(workspaceBilling.workspaceId, demo));
  await db().execute(sql`delete from abuse_counters`);
});

describe("plan limits on every plate path", () => {
  it("the slab editor's 'Make the plate' with a logo on the Bench plan is refused and stores nothing", async () => {
    const s = await signInOverHttp(demoUser("designer").email, demoUser("designer").password);
    const [kit] = await db().select().from(kits).where(eq(kits.workspaceId, demo)).orderBy(kits.createdAt).limit(1);
    const before = (await db().select({ n: count() }).from(plates).where(eq(plates.workspaceId, demo)))[0]!.n;
    const res = await callAction(
      `/kits/${kit!.id}/slab`,
      "app/(workspace)/kits/actions.ts",
      "makePlateAction",
      [{ kitId: kit!.id, options: { marks: { logo: LOGO } }, variables: {} }],
      { cookie: s.cookie() },
    );
    expect(res.body).toContain("plan_limit");
    expect(res.body).toMatch(/Logos come with the Workshop and Farm plans/);
    const after = (
      await db()
        .select({ n: count() })
        .from(plates)
        .where(and(eq(plates.workspaceId, demo)))
    )[0]!.n;
    expect(after).toBe(before);
    // Without the logo the same request makes its plate (the refusal was the logo, not the plan's quota).
    const ok = await callAction(
      `/kits/${kit!.id}/slab`,
      "app/(workspace)/kits/actions.ts",
      "makePlateAction",
      [{ kitId: kit!.id, options: {}, variables: {} }],
      { cookie: s.cookie() },
    );
    expect(ok.body).toContain('"ok":true');
  });
});
