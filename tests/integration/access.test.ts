import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";

// Server actions and guards run here as they do in the app, against the real test database; only
// the request context (who is signed in, the workspace cookie) is supplied by the test.
const session = vi.hoisted(() => ({ userId: null as string | null, cookie: undefined as string | undefined }));
vi.mock("@/lib/auth/config", () => ({
  auth: async () => (session.userId ? { user: { id: session.userId } } : null),
  signIn: async () => undefined,
  signOut: async () => undefined,
  handlers: {},
}));
vi.mock("next/headers", () => ({
  cookies: async () => ({
    get: (name: string) => (name === "sw_workspace" && session.cookie ? { value: session.cookie } : undefined),
    set: (_name: string, value: string) => {
      session.cookie = value;
    },
  }),
  headers: async () => new Headers({ "x-forwarded-for": "203.0.113.7" }),
}));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

import { db } from "@/db";
import { DEMO_USERS } from "@/db/seed";
import { createApiKey } from "@/lib/accounts/api-keys";
import { acceptInvitation, inviteMember } from "@/lib/accounts/invitations";
import { apiKeys, auditEvents, devOutbox, invitations, kits, memberships, users, workspaces, type Role } from "@/db/schema";
import { authorize, callerFor, loadCaller, type Caller } from "@/lib/auth/guards";
import { hashPassword } from "@/lib/auth/password";
import type { Permission } from "@/lib/auth/permissions";
import {
  dropApiKey,
  dropMember,
  makeApiKey,
  sendInvitation,
  sendInvitationAgain,
  setMemberRole,
  withdrawInvitation,
} from "@/app/(workspace)/settings/actions";
import { GET as getKit } from "@/app/api/v1/kits/[id]/route";
import { GET as listKitsRoute } from "@/app/api/v1/kits/route";

const logged: string[] = [];
const spies = (["log", "info", "warn", "error"] as const).map((level) =>
  vi.spyOn(console, level).mockImplementation((...args: unknown[]) => {
    logged.push(
      args.map((a) => (a instanceof Error ? `${a.message} ${a.stack}` : typeof a === "string" ? a : JSON.stringify(a))).join(" "),
    );
  }),
);

let ids: Record<Role, string>;
let demoWs: string;
let otherWs: string;
let otherKit: string;
let otherOwner: string;
const secrets: string[] = DEMO_USERS.map((u) => u.password);

async function userId(email: string) {
  const [u] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
  return u!.id;
}
function as(role: Role | string | null) {
  session.userId = role === null ? null : ((ids as Record<string, string>)[role] ?? role);
  session.cookie = undefined;
}
async function callerAs(role: Role): Promise<Caller> {
  as(role);
  return (await loadCaller())!;
}

beforeAll(async () => {
  ids = Object.fromEntries(await Promise.all(DEMO_USERS.map(async (u) => [u.role, await userId(u.email)]))) as Record<Role, string>;
  const [ws] = await db().select().from(workspaces).where(eq(workspaces.slug, "marrowby"));
  demoWs = ws!.id;
  // A second, unrelated workspace with its own owner and kit.
  const [o] = await db()
    .insert(users)
    .values({ email: `other-${Date.now()}@example.com`, name: "Other Owner", passwordHash: await hashPassword("another-password-1") })
    .returning();
  otherOwner = o!.id;
  const [w] = await db()
    .insert(workspaces)
    .values({ name: "Other Farm", slug: `other-${Date.now()}` })
    .returning();
  otherWs = w!.id;
  await db().insert(memberships).values({ workspaceId: otherWs, userId: otherOwner, role: "owner" });
  const [k] = await db().insert(kits).values({ workspaceId: otherWs, name: "Their kit" }).returning();
  otherKit = k!.id;
});

afterAll(async () => {
  await db().delete(workspaces).where(eq(workspaces.id, otherWs));
  await db().delete(users).where(eq(users.id, otherOwner));
  for (const s of spies) s.mockRestore();
});

beforeEach(() => {
  session.userId = null;
  session.cookie = undefined;
});

// The role table, written out here as the reference the guards are checked against.
const TABLE: [Permission, Role[]][] = [
  ["workspace:view", ["owner", "designer", "operator", "viewer"]],
  ["parts:write", ["owner", "designer"]],
  ["kits:write", ["owner", "designer"]],
  ["templates:write", ["owner", "designer"]],
  ["plates:make", ["owner", "designer"]],
  ["plates:reprint", ["owner", "designer", "operator"]],
  ["plates:download", ["owner", "designer", "operator"]],
  ["inspections:record", ["owner", "designer", "operator"]],
  ["members:manage", ["owner"]],
  ["invitations:manage", ["owner"]],
  ["api-keys:manage", ["owner"]],
  ["billing:manage", ["owner"]],
  ["audit:view", ["owner"]],
];
const ROLES: Role[] = ["owner", "designer", "operator", "viewer"];

describe("the role table, role × action", () => {
  for (const [permission, allowed] of TABLE) {
    for (const role of ROLES) {
      const ok = allowed.includes(role);
      it(`${role} ${ok ? "may" : "may not"} ${permission}`, async () => {
        as(role);
        if (ok) await expect(authorize(permission, permission)).resolves.toMatchObject({ role });
        else await expect(authorize(permission, permission)).rejects.toMatchObject({ status: 403, code: "forbidden" });
      });
    }
  }

  it("owner-only actions refuse every other role and leave nothing changed", async () => {
    for (const role of ["designer", "operator", "viewer"] as Role[]) {
      as(role);
      const before = await db()
        .select({ n: sql<number>`count(*)::int` })
        .from(invitations);
      expect(await sendInvitation({ email: `x-${role}@example.com`, role: "viewer" })).toMatchObject({ ok: false, code: "forbidden" });
      expect(await setMemberRole({ userId: ids.viewer, role: "owner" })).toMatchObject({ ok: false, code: "forbidden" });
      expect(await dropMember({ userId: ids.viewer })).toMatchObject({ ok: false, code: "forbidden" });
      expect(await makeApiKey({ name: "sneaky", scopes: ["plates:read"] })).toMatchObject({ ok: false, code: "forbidden" });
      const after = await db()
        .select({ n: sql<number>`count(*)::int` })
        .from(invitations);
      expect(after).toEqual(before);
    }
    const [viewer] = await db().select().from(memberships).where(eq(memberships.userId, ids.viewer));
    expect(viewer!.role).toBe("viewer");
  });

  it("a signed-out caller is refused", async () => {
    as(null);
    await expect(authorize("workspace:view", "looking")).rejects.toMatchObject({ status: 401 });
    expect(await makeApiKey({ name: "k", scopes: ["plates:read"] })).toMatchObject({ ok: false, code: "unauthorized" });
  });

  it("bad input gets field errors before anything else", async () => {
    as("owner");
    const r = await sendInvitation({ email: "not-an-address", role: "viewer" });
    expect(r).toMatchObject({ ok: false });
    expect(!r.ok && r.fieldErrors?.email?.[0]).toMatch(/e-mail address/);
  });
});

describe("members and the last owner", () => {
  it("an owner changes roles and the change is audited", async () => {
    as("owner");
    expect(await setMemberRole({ userId: ids.viewer, role: "operator" })).toMatchObject({ ok: true });
    expect(await setMemberRole({ userId: ids.viewer, role: "viewer" })).toMatchObject({ ok: true });
    const events = await db().select().from(auditEvents).where(eq(auditEvents.action, "role_changed"));
    expect(events.some((e) => e.target === ids.viewer && (e.details as { to?: string }).to === "viewer")).toBe(true);
  });

  it("the last owner can neither be demoted nor removed", async () => {
    as("owner");
    expect(await setMemberRole({ userId: ids.owner, role: "designer" })).toMatchObject({ ok: false, code: "last_owner" });
    expect(await dropMember({ userId: ids.owner })).toMatchObject({ ok: false, code: "last_owner" });
    // With a second owner, the first may step down.
    expect(await setMemberRole({ userId: ids.designer, role: "owner" })).toMatchObject({ ok: true });
    expect(await setMemberRole({ userId: ids.owner, role: "designer" })).toMatchObject({ ok: true });
    session.userId = ids.designer; // now the owner
    expect(await setMemberRole({ userId: ids.owner, role: "owner" })).toMatchObject({ ok: true });
    expect(await setMemberRole({ userId: ids.designer, role: "designer" })).toMatchObject({ ok: true });
  });

  it("a removed member's next request is refused, whatever their session says", async () => {
    const [temp] = await db()
      .insert(users)
      .values({ email: `temp-${Date.now()}@example.com`, name: "Temp" })
      .returning();
    await db().insert(memberships).values({ workspaceId: demoWs, userId: temp!.id, role: "designer" });
    as(temp!.id);
    await expect(authorize("parts:write", "uploading")).resolves.toBeTruthy();
    as("owner");
    expect(await dropMember({ userId: temp!.id })).toMatchObject({ ok: true });
    as(temp!.id);
    await expect(authorize("workspace:view", "looking")).rejects.toMatchObject({ status: 401 });
    expect(await loadCaller()).toBeNull();
    await db().delete(users).where(eq(users.id, temp!.id));
  });

  it("another workspace's cookie does not open it", async () => {
    as("designer");
    session.cookie = otherWs;
    const caller = await loadCaller();
    expect(caller!.workspace.id).toBe(demoWs);
  });
});

describe("invitations", () => {
  const latestToken = async (to: string) => {
    const mail = await db()
      .select()
      .from(devOutbox)
      .where(sql`${devOutbox.toAddresses} like ${"%" + to + "%"}`)
      .orderBy(sql`received_at desc`)
      .limit(1);
    const m = /\/invite\/([A-Za-z0-9_-]+)/.exec(mail[0]?.text ?? "");
    return m?.[1];
  };
  async function waitForToken(to: string) {
    for (let i = 0; i < 50; i++) {
      const t = await latestToken(to);
      if (t) return t;
      await new Promise((r) => setTimeout(r, 100));
    }
    throw new Error(`no invitation mail reached the fake SMTP outbox for ${to}`);
  }

  it("is e-mailed, stored only as a hash, single use, and only for its address", async () => {
    const email = `invitee-${Date.now()}@example.com`;
    as("owner");
    expect(await sendInvitation({ email, role: "operator" })).toMatchObject({ ok: true });
    const token = await waitForToken(email);
    secrets.push(token);
    const [row] = await db().select().from(invitations).where(eq(invitations.email, email));
    expect(row!.tokenHash).not.toContain(token);
    expect(JSON.stringify(row)).not.toContain(token);

    const [wrong] = await db()
      .insert(users)
      .values({ email: `wrong-${Date.now()}@example.com` })
      .returning();
    await expect(acceptInvitation({ id: wrong!.id, email: wrong!.email, name: null }, token)).rejects.toMatchObject({
      code: "invitation_other_email",
    });
    const [invitee] = await db().insert(users).values({ email }).returning();
    await acceptInvitation({ id: invitee!.id, email, name: null }, token);
    const caller = await callerFor({ id: invitee!.id, email, name: null });
    expect(caller).toMatchObject({ role: "operator", workspace: { id: demoWs } });
    await expect(acceptInvitation({ id: invitee!.id, email, name: null }, token)).rejects.toMatchObject({
      code: "invitation_used",
      message: expect.stringMatching(/already been used/),
    });
    await db().delete(users).where(eq(users.id, invitee!.id));
    await db().delete(users).where(eq(users.id, wrong!.id));
  });

  it("refuses an expired invitation, and a withdrawn one, with a clear message", async () => {
    const owner = await callerAs("owner");
    const email = `late-${Date.now()}@example.com`;
    await inviteMember(owner, email, "viewer");
    const token = await waitForToken(email);
    await db()
      .update(invitations)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(invitations.email, email));
    const [u] = await db().insert(users).values({ email }).returning();
    await expect(acceptInvitation({ id: u!.id, email, name: null }, token)).rejects.toMatchObject({
      code: "invitation_expired",
      message: expect.stringMatching(/expired/),
    });

    const email2 = `withdrawn-${Date.now()}@example.com`;
    await inviteMember(owner, email2, "viewer");
    const token2 = await waitForToken(email2);
    const [inv] = await db().select().from(invitations).where(eq(invitations.email, email2));
    as("owner");
    expect(await withdrawInvitation({ id: inv!.id })).toMatchObject({ ok: true });
    await expect(acceptInvitation({ id: u!.id, email: email2, name: null }, token2)).rejects.toMatchObject({ code: "invitation_revoked" });
    await expect(acceptInvitation({ id: u!.id, email, name: null }, "x".repeat(43))).rejects.toMatchObject({ code: "invitation_unknown" });
    await db().delete(users).where(eq(users.id, u!.id));
  });

  it("mails nothing for a second invitation to a waiting address; sending it again gives a new link and retires the old", async () => {
    const email = `twice-${Date.now()}@example.com`;
    as("owner");
    expect(await sendInvitation({ email, role: "designer" })).toMatchObject({ ok: true });
    const token = await waitForToken(email);
    secrets.push(token);
    const mails = async () =>
      (
        await db()
          .select({ id: devOutbox.id })
          .from(devOutbox)
          .where(sql`${devOutbox.toAddresses} like ${"%" + email + "%"}`)
      ).length;

    const again = await sendInvitation({ email, role: "viewer" });
    expect(again).toMatchObject({ ok: false, code: "invitation_pending", fieldErrors: { email: [expect.stringContaining(email)] } });
    expect(again.ok ? "" : again.message).toMatch(/is already waiting, sent \d{1,2} [A-Z][a-z]{2,3}, as a designer\./);
    await new Promise((r) => setTimeout(r, 500));
    expect(await mails()).toBe(1);

    expect(await sendInvitationAgain({ email })).toMatchObject({ ok: true });
    let fresh: string | undefined;
    for (let i = 0; i < 50 && (!fresh || fresh === token); i++) {
      fresh = await latestToken(email);
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(fresh).toBeDefined();
    expect(fresh).not.toBe(token);
    secrets.push(fresh!);
    expect(await mails()).toBe(2);
    const open = await db()
      .select()
      .from(invitations)
      .where(sql`${invitations.email} = ${email} and ${invitations.revokedAt} is null`);
    expect(open.map((i) => i.role)).toEqual(["designer"]); // one waiting, with the role it had
    const [event] = await db()
      .select()
      .from(auditEvents)
      .where(sql`${auditEvents.action} = 'invitation_resent' and ${auditEvents.target} = ${email}`);
    expect(event).toMatchObject({ workspaceId: demoWs, actorUserId: ids.owner, details: { role: "designer" } });

    const [u] = await db().insert(users).values({ email }).returning();
    await expect(acceptInvitation({ id: u!.id, email, name: null }, token)).rejects.toMatchObject({ code: "invitation_revoked" });
    await acceptInvitation({ id: u!.id, email, name: null }, fresh!);
    // Nothing is waiting any more: sending again is refused, at the field.
    expect(await sendInvitationAgain({ email })).toMatchObject({ ok: false, code: "not_found", fieldErrors: { email: expect.any(Array) } });
    await db().delete(users).where(eq(users.id, u!.id));
  });

  it("refuses to invite someone who is already a member, at the field", async () => {
    as("owner");
    const r = await sendInvitation({ email: "dario@marrowby.example", role: "viewer" });
    expect(r).toMatchObject({ ok: false, code: "already_member" });
  });
});

describe("API keys and cross-workspace access", () => {
  const call = (handler: (req: Request, ctx: never) => Promise<Response>, key: string | null, path: string, ctx: unknown = {}) =>
    handler(new Request(`http://localhost${path}`, { headers: key ? { authorization: `Bearer ${key}` } : {} }), ctx as never);

  it("a key is shown once, stored as a hash, and answers for its own workspace only", async () => {
    as("owner");
    const made = await makeApiKey({ name: "Test order system", scopes: ["kits:read"] });
    expect(made.ok).toBe(true);
    const key = made.ok ? made.data.key : "";
    secrets.push(key);
    const [row] = await db()
      .select()
      .from(apiKeys)
      .where(eq(apiKeys.prefix, made.ok ? made.data.prefix : ""));
    expect(JSON.stringify(row)).not.toContain(key);

    const list = await call(listKitsRoute as never, key, "/api/v1/kits");
    expect(list.status).toBe(200);
    const body = (await list.json()) as { kits: { name: string }[] };
    expect(body.kits.map((k) => k.name)).toContain("Harbour Run token set");
    expect(body.kits.map((k) => k.name)).not.toContain("Their kit");

    // Another workspace's kit by id: 404, the same as a kit that does not exist.
    const theirs = await call(getKit as never, key, `/api/v1/kits/${otherKit}`, { params: Promise.resolve({ id: otherKit }) });
    expect(theirs.status).toBe(404);
    expect(await theirs.json()).toEqual({ error: { code: "not_found", message: "No such kit." } });
    const none = await call(getKit as never, key, "/api/v1/kits/nope", { params: Promise.resolve({ id: "nope" }) });
    expect(none.status).toBe(404);

    const [ours] = await db().select().from(kits).where(eq(kits.workspaceId, demoWs)).orderBy(kits.createdAt);
    const mine = await call(getKit as never, key, `/api/v1/kits/${ours!.id}`, { params: Promise.resolve({ id: ours!.id }) });
    expect(mine.status).toBe(200);
    expect(((await mine.json()) as { kit: { parts: unknown[] } }).kit.parts).toHaveLength(2);
    const [used] = await db().select().from(apiKeys).where(eq(apiKeys.id, row!.id));
    expect(used!.lastUsedAt).not.toBeNull();

    // Revoked: 401 at once.
    expect(await dropApiKey({ id: row!.id })).toMatchObject({ ok: true });
    const after = await call(listKitsRoute as never, key, "/api/v1/kits");
    expect(after.status).toBe(401);
    expect(((await after.json()) as { error: { code: string } }).error.code).toBe("unauthorized");
  });

  it("refuses a missing or malformed key (401) and a key without the scope (403)", async () => {
    expect((await call(listKitsRoute as never, null, "/api/v1/kits")).status).toBe(401);
    expect((await call(listKitsRoute as never, "swk_nothing", "/api/v1/kits")).status).toBe(401);
    const owner = await callerAs("owner");
    const { key } = await createApiKey(owner, "plates only", ["plates:read"]);
    secrets.push(key);
    const r = await call(listKitsRoute as never, key, "/api/v1/kits");
    expect(r.status).toBe(403);
  });

  it("cannot revoke another workspace's key (not found, nothing changed)", async () => {
    const theirCaller = (await callerFor({ id: otherOwner, email: "x", name: null }))!;
    const { key } = await createApiKey(theirCaller, "theirs", ["kits:read"]);
    secrets.push(key);
    const [theirs] = await db().select().from(apiKeys).where(eq(apiKeys.workspaceId, otherWs));
    as("owner");
    expect(await dropApiKey({ id: theirs!.id })).toMatchObject({ ok: false, code: "not_found" });
    const [still] = await db().select().from(apiKeys).where(eq(apiKeys.id, theirs!.id));
    expect(still!.revokedAt).toBeNull();
  });

  it("limits requests per key per minute: 429 with Retry-After", async () => {
    const owner = await callerAs("owner");
    const { key } = await createApiKey(owner, "busy", ["kits:read"]);
    secrets.push(key);
    let last: Response | undefined;
    for (let i = 0; i < 125; i++) {
      last = await call(listKitsRoute as never, key, "/api/v1/kits");
      if (last.status === 429) break;
    }
    expect(last!.status).toBe(429);
    expect(Number(last!.headers.get("retry-after"))).toBeGreaterThan(0);
    expect(((await last!.json()) as { error: { code: string } }).error.code).toBe("rate_limited");
  });
});

describe("secrets", () => {
  it("never appear in logs or in the database in clear (outside the dev outbox)", async () => {
    const everything = JSON.stringify(
      await db().execute(
        sql`select (select json_agg(u) from users u) as u, (select json_agg(k) from api_keys k) as k, (select json_agg(i) from 
          invitations i) as i, (select json_agg(a) from audit_events a) as a, (select json_agg(v) from verification_tokens v) as v`,
      ),
    );
    expect(secrets.length).toBeGreaterThan(5);
    for (const s of secrets) {
      expect(everything).not.toContain(s);
      for (const line of logged) expect(line).not.toContain(s);
    }
  });
});
