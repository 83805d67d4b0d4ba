import { eq, sql } from "drizzle-orm";
import { afterAll, beforeEach, describe, expect, it } from "vitest";
import { db } from "@/db";
import { auditEvents, users } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import { FREE_SIGN_IN_FAILURES } from "@/lib/auth/rate-limit";
import { callAction, Jar } from "../../support/actions";
import { baseUrl, demoUser, signInOverHttp } from "../../support/http";
import { mailCount, mailTo } from "../../support/mail";

// Attacks on accounts, replayed over HTTP against the built app that npm test starts. Each names
// the OWASP ASVS 4.0 requirement (or OWASP Web Security Testing Guide test) it holds the app to.

const AUTH = "app/(auth)/actions.ts";
const ACCOUNT = "app/(workspace)/settings/account/actions.ts";
const stamp = () => `${Date.now()}-${Math.random().toString(36).slice(2, 7)}`;

async function clearLimits() {
  // Each test starts from fresh abuse counters; the limits themselves are what some tests check.
  await db().execute(sql`delete from abuse_counters`);
}
beforeEach(clearLimits);
afterAll(clearLimits);

/** A person who has only ever signed in by e-mailed link: a user row with no password. */
async function linkOnlyUser(email: string): Promise<string> {
  const [u] = await db().insert(users).values({ email, name: "Link Only", emailVerified: new Date() }).returning({ id: users.id });
  return u!.id;
}

async function passwordUser(email: string, password: string): Promise<string> {
  const [u] = await db()
    .insert(users)
    .values({ email, name: "Has Password", passwordHash: await hashPassword(password), emailVerified: new Date() })
    .returning({ id: users.id });
  return u!.id;
}

/** Sign in with e-mail + password the way the sign-in form's callback does; the answer's redirect says how it went. */
async function tryPassword(
  email: string,
  password: string,
  headers: Record<string, string> = {},
): Promise<{ ok: boolean; code: string | null; ms: number }> {
  const csrf = await fetch(`${baseUrl()}/api/auth/csrf`);
  const cookie = csrf.headers
    .getSetCookie()
    .map((c) => c.split(";")[0])
    .join("; ");
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const t0 = performance.now();
  const res = await fetch(`${baseUrl()}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie, ...headers },
    body: new URLSearchParams({ csrfToken, email, password, callbackUrl: baseUrl() }),
  });
  const ms = performance.now() - t0;
  const location = res.headers.get("location") ?? "";
  const ok = res.headers.getSetCookie().some((c) => c.includes("session-token=") && !/session-token=;/.test(c));
  return { ok, code: new URL(location, baseUrl()).searchParams.get("code"), ms };
}

async function signUpOverHttp(input: { name: string; email: string; password: string; workshop?: string }) {
  return callAction("/sign-up", AUTH, "signUp", [input]);
}

/** Sign up and use the mailed link: a new person with a workshop of their own, signed in. */
async function signUpStranger(email: string, password: string): Promise<Jar> {
  const since = new Date();
  const answer = await signUpOverHttp({ name: "Stranger", email, password });
  expect(answer.redirect).toBe("/check-email?for=sign-up");
  const mail = await mailTo(email, { since, subject: /Finish creating/ });
  const link = mail.links.find((l) => l.includes("/sign-up/confirm/"))!;
  const token = link.split("/").pop()!;
  const finished = await callAction(new URL(link).pathname, AUTH, "finishSignUpFromLink", [{ token }]);
  const jar = new Jar().take(finished.setCookies);
  expect(jar.has("session-token")).toBe(true);
  return jar;
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return (s[Math.floor((s.length - 1) / 2)]! + s[Math.ceil((s.length - 1) / 2)]!) / 2;
};

describe("sign-up cannot claim an existing account", () => {
  // ASVS 4.0 V2.5.6 (recovery paths are secure), WSTG-IDNT-02 (registration process).
  it("leaves a link-only user untouched, signs nobody in, and mails the address", async () => {
    const email = `link-only-${stamp()}@example.com`;
    const id = await linkOnlyUser(email);
    const since = new Date();
    const answer = await signUpOverHttp({ name: "Mallory", email, password: "attacker-chosen-pass" });
    expect(answer.redirect).toBe("/check-email?for=sign-up");
    expect(answer.setCookies.some((c) => c.includes("session-token="))).toBe(false);
    const [u] = await db().select().from(users).where(eq(users.id, id));
    expect(u!.passwordHash).toBeNull();
    expect(u!.name).toBe("Link Only");
    expect((await tryPassword(email, "attacker-chosen-pass")).ok).toBe(false);
    const mail = await mailTo(email, { since });
    expect(mail.subject).toMatch(/tried to create a Slabwright account/);
    expect(mail.text).toMatch(/Nothing was changed/);
    expect(mail.links.some((l) => l.endsWith("/reset-password"))).toBe(true);
  });

  it("answers a new address exactly as a known one, and makes nothing until the mailed link is used", async () => {
    const known = `known-${stamp()}@example.com`;
    await passwordUser(known, "the-owners-password");
    const fresh = `fresh-${stamp()}@example.com`;
    const a = await signUpOverHttp({ name: "A", email: known, password: "some-long-password" });
    const b = await signUpOverHttp({ name: "B", email: fresh, password: "some-long-password" });
    expect(a.status).toBe(b.status);
    expect(a.redirect).toBe(b.redirect);
    expect(await db().select().from(users).where(eq(users.email, fresh))).toHaveLength(0);
    // The owner's password still works, the stranger's does not.
    expect((await tryPassword(known, "the-owners-password")).ok).toBe(true);
    expect((await tryPassword(known, "some-long-password")).ok).toBe(false);
  });

  it("gives a link-only user a first password only through the link mailed to that address", async () => {
    const email = `first-password-${stamp()}@example.com`;
    await linkOnlyUser(email);
    const since = new Date();
    await callAction("/reset-password", AUTH, "askPasswordReset", [{ email }]);
    const link = (await mailTo(email, { since, subject: /Reset your Slabwright password/ })).links[0]!;
    const token = link.split("/").pop()!;
    const done = await callAction(new URL(link).pathname, AUTH, "confirmPasswordReset", [
      { token, email, password: "chosen-by-the-owner" },
    ]);
    // Home sends each role on to its own landing page.
    expect(done.redirect).toBe("/home");
    expect((await tryPassword(email, "chosen-by-the-owner")).ok).toBe(true);
  });
});

describe("the demo outbox", () => {
  // ASVS 4.0 V4.2.1 (no access to other users' records), V4.1.3 (least privilege).
  it("shows a stranger none of another workspace's mail, not even a count", async () => {
    // Mail for others first: a sign-in link for the demo owner and one for an unrelated address.
    await callAction("/sign-in", AUTH, "sendSignInLink", [{ email: demoUser("owner").email }]);
    await callAction("/sign-in", AUTH, "sendSignInLink", [{ email: `someone-else-${stamp()}@example.com` }]);
    const email = `stranger-${stamp()}@example.com`;
    const jar = await signUpStranger(email, "stranger-password-1");
    const page = await fetch(`${baseUrl()}/settings/outbox`, { headers: { cookie: jar.header() } });
    expect(page.status).toBe(200);
    const html = await page.text();
    const shown = [...html.matchAll(/>to (?:<!-- -->)?([^<]+)<\/p>/g)].map((m) => m[1]!.trim());
    // Only the stranger's own sign-up mail; nothing addressed to anyone else.
    expect(shown.length).toBeGreaterThan(0);
    expect(shown.every((to) => to === email)).toBe(true);
    expect(html).not.toContain(demoUser("owner").email);
    expect(html).not.toMatch(/api\/auth\/callback\/nodemailer/);
  });
});

describe("sessions end when they should", () => {
  // ASVS 4.0 V3.3.1 (logout invalidates the session token), V3.3.3 (end other sessions after a password change).
  const stillIn = async (cookie: string) => (await fetch(`${baseUrl()}/api/parts`, { headers: { cookie } })).status;

  it("a cookie replayed after signing out no longer works", async () => {
    const s = await signInOverHttp(demoUser("viewer").email, demoUser("viewer").password);
    const cookie = s.cookie();
    expect(await stillIn(cookie)).toBe(200);
    const csrf = await s.fetch("/api/auth/csrf");
    const { csrfToken } = (await csrf.json()) as { csrfToken: string };
    const out = await s.fetch("/api/auth/signout", {
      method: "POST",
      redirect: "manual",
      headers: { "content-type": "application/x-www-form-urlencoded" },
      body: new URLSearchParams({ csrfToken, callbackUrl: baseUrl() }),
    });
    expect(out.status).toBe(302);
    expect(await stillIn(cookie)).toBe(401);
  });

  it("a password reset ends every session of the account", async () => {
    const email = `reset-ends-${stamp()}@example.com`;
    await signUpStranger(email, "before-the-reset");
    const other = await signInOverHttp(email, "before-the-reset");
    expect(await stillIn(other.cookie())).toBe(200);
    const since = new Date();
    await callAction("/reset-password", AUTH, "askPasswordReset", [{ email }]);
    const token = (await mailTo(email, { since, subject: /Reset/ })).links[0]!.split("/").pop()!;
    await callAction(`/reset-password/${token}`, AUTH, "confirmPasswordReset", [{ token, email, password: "after-the-reset" }]);
    expect(await stillIn(other.cookie())).toBe(401);
  });

  it("signing out everywhere ends the other sessions too; a password change keeps only the changing one", async () => {
    const email = `everywhere-${stamp()}@example.com`;
    await signUpStranger(email, "first-password-here");
    const a = await signInOverHttp(email, "first-password-here");
    const b = await signInOverHttp(email, "first-password-here");
    // Change the password from session a: b ends, a goes on with the cookie the change sets.
    const changed = await callAction(
      "/settings/account",
      ACCOUNT,
      "changeMyPassword",
      [{ current: "first-password-here", password: "second-password-here" }],
      { cookie: a.cookie() },
    );
    expect(changed.body).toContain("Password changed");
    expect(await stillIn(b.cookie())).toBe(401);
    const aNow = new Jar()
      .take(
        a
          .cookie()
          .split("; ")
          .map((c) => `${c}; Path=/`),
      )
      .take(changed.setCookies);
    expect(await stillIn(aNow.header())).toBe(200);
    const c = await signInOverHttp(email, "second-password-here");
    const out = await callAction("/settings/account", ACCOUNT, "signOutEverywhere", [], { cookie: c.cookie() });
    expect(out.redirect).toBe("/sign-in");
    expect(await stillIn(aNow.header())).toBe(401);
    expect(await stillIn(c.cookie())).toBe(401);
  });
});

describe("nobody learns who has an account", () => {
  // WSTG-IDNT-04 (account enumeration); ASVS 4.0 V2.2.1 (anti-automation without giving hints).
  it("a wrong password takes as long for an unknown address as for a known one (medians within 25 % over 10 tries)", async () => {
    const known = `timing-known-${stamp()}@example.com`;
    await passwordUser(known, "the-real-password");
    const unknown = `timing-unknown-${stamp()}@example.com`;
    const k: number[] = [];
    const u: number[] = [];
    for (let i = 0; i < 10; i++) {
      // Interleaved, so a busy moment on the machine falls on both.
      k.push((await tryPassword(known, `wrong-${i}`)).ms);
      u.push((await tryPassword(unknown, `wrong-${i}`)).ms);
    }
    const [mk, mu] = [median(k), median(u)];
    expect(Math.abs(mk - mu) / Math.max(mk, mu)).toBeLessThan(0.25);
  });

  it("sign-up and reset answer the same for known and unknown addresses, in about the same time", async () => {
    const known = `enum-known-${stamp()}@example.com`;
    await passwordUser(known, "some-password-1");
    const k: number[] = [];
    const u: number[] = [];
    const answers = new Set<string>();
    for (let i = 0; i < 10; i++) {
      await clearLimits();
      let t0 = performance.now();
      const a = await signUpOverHttp({ name: "X", email: known, password: "whatever-password" });
      k.push(performance.now() - t0);
      t0 = performance.now();
      const b = await signUpOverHttp({ name: "X", email: `enum-unknown-${stamp()}@example.com`, password: "whatever-password" });
      u.push(performance.now() - t0);
      answers.add(`${a.status} ${a.redirect}`).add(`${b.status} ${b.redirect}`);
    }
    expect([...answers]).toEqual(["200 /check-email?for=sign-up"]);
    const [mk, mu] = [median(k), median(u)];
    expect(Math.abs(mk - mu) / Math.max(mk, mu)).toBeLessThan(0.25);
    const r1 = await callAction("/reset-password", AUTH, "askPasswordReset", [{ email: known }]);
    const r2 = await callAction("/reset-password", AUTH, "askPasswordReset", [{ email: `enum-nobody-${stamp()}@example.com` }]);
    const said = (body: string) => body.match(/"message":"[^"]*"/)?.[0];
    expect(said(r1.body)).toMatch(/If an account uses that address/);
    expect(said(r1.body)).toBe(said(r2.body));
  });
});

describe("abuse limits", () => {
  // ASVS 4.0 V2.2.1 (soft lockout and rate limiting, not a hard lock of the real owner), V11.1.4 (anti-automation).
  it("take the client's address from the socket: a forged X-Forwarded-For buys no fresh tries", async () => {
    const email = `forged-${stamp()}@example.com`;
    for (let i = 0; i < 4; i++)
      await tryPassword(email, `guess-${i}`, { "x-forwarded-for": `198.51.100.${i + 1}`, "x-real-ip": `198.51.100.${i + 1}` });
    const rows = await db().execute<{ key: string; points: number }>(
      sql`select key, points from abuse_counters where key like 'signInFailuresPerIp:%'`,
    );
    expect(rows.rows).toEqual([{ key: "signInFailuresPerIp:127.0.0.1", points: 4 }]);
    const logged = await db().select({ ip: auditEvents.ip }).from(auditEvents).where(eq(auditEvents.actorEmail, email));
    expect(new Set(logged.map((l) => l.ip))).toEqual(new Set(["127.0.0.1"]));
  });

  it(
    "slow an account after its free wrong passwords (1 s, then 2 s …) rather than lock it, and a mailed link still signs its owner " + "in",
    async () => {
      const email = `slowed-${stamp()}@example.com`;
      await passwordUser(email, "the-owners-password");
      for (let i = 0; i < FREE_SIGN_IN_FAILURES; i++) expect((await tryPassword(email, `guess-${i}`)).code).toBe("bad_credentials");
      expect((await tryPassword(email, "guess-x")).code).toBe("bad_credentials"); // the 11th: a wait of 1 s begins
      const held = await tryPassword(email, "the-owners-password");
      expect(held.ok).toBe(false);
      expect(held.code).toMatch(/^rate_limited:[12]$/);
      // The e-mailed link is never held back.
      const since = new Date();
      await callAction("/sign-in", AUTH, "sendSignInLink", [{ email }]);
      const link = (await mailTo(email, { since, subject: /sign-in link/ })).links[0]!;
      const res = await fetch(link, { redirect: "manual" });
      expect(res.headers.getSetCookie().some((c) => c.includes("session-token="))).toBe(true);
      // After the short wait the owner's own password works again.
      await new Promise((r) => setTimeout(r, 2100));
      expect((await tryPassword(email, "the-owners-password")).ok).toBe(true);
    },
  );

  it("throttle sign-in link mail per address", async () => {
    const email = `flood-${stamp()}@example.com`;
    const since = new Date();
    const answers = [];
    for (let i = 0; i < 6; i++) answers.push(await callAction("/sign-in", AUTH, "sendSignInLink", [{ email }]));
    expect(answers.filter((a) => a.body.includes("rate_limited"))).toHaveLength(3);
    await new Promise((r) => setTimeout(r, 1000));
    expect(await mailCount(email, since)).toBe(3);
  });
});

describe("cookie-authenticated route handlers refuse other sites", () => {
  // ASVS 4.0 V4.2.2 (CSRF), V13.2.3 (anti-CSRF on cookie-authenticated REST).
  it("a state-changing request with a foreign Origin or Sec-Fetch-Site is 403 cross_site", async () => {
    const s = await signInOverHttp(demoUser("designer").email, demoUser("designer").password);
    const body = new Uint8Array(84);
    const foreign: Record<string, string>[] = [
      { origin: "https://evil.example" },
      { "sec-fetch-site": "cross-site", origin: "https://evil.example" },
      { "sec-fetch-site": "same-site" },
    ];
    for (const headers of foreign) {
      const res = await s.fetch("/api/parts?name=x.stl", { method: "POST", headers, body });
      expect(res.status).toBe(403);
      expect(((await res.json()) as { error: { code: string } }).error.code).toBe("cross_site");
    }
    // The same request from our own pages gets past the check (and is judged on its content).
    const own = await s.fetch("/api/parts?name=x.stl", {
      method: "POST",
      headers: { origin: baseUrl(), "sec-fetch-site": "same-origin" },
      body,
    });
    expect(own.status).not.toBe(403);
  });
});
