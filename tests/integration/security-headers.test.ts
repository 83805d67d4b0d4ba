import { and, eq, isNotNull } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { db } from "@/db";
import { parts, workspaces } from "@/db/schema";
import { baseUrl, demoUser, signInOverHttp } from "../support/http";

// The Content-Security-Policy the started app sends, read from real responses over HTTP.
const directive = (csp: string, name: string) =>
  csp
    .split(";")
    .map((d) => d.trim())
    .find((d) => d === name || d.startsWith(`${name} `)) ?? "";

/** Every opening <script …> tag of a page. */
const scriptTags = (html: string) => [...html.matchAll(/<script\b[^>]*>/gi)].map((m) => m[0]);

async function page(path: string, cookie?: string) {
  const r = await fetch(`${baseUrl()}${path}`, { headers: cookie ? { cookie } : {}, redirect: "manual" });
  expect(r.status, path).toBe(200);
  const csp = r.headers.get("content-security-policy") ?? "";
  return { csp, html: await r.text() };
}

describe("Content-Security-Policy on pages: a fresh nonce instead of 'unsafe-inline'", () => {
  // ASVS 4.0 V14.4.3: a CSP response header that reduces the impact of XSS (no 'unsafe-inline' for scripts).
  it("has a 'nonce-…' in script-src, no 'unsafe-inline', and the nonce on every script tag", async () => {
    const owner = demoUser("owner");
    const session = await signInOverHttp(owner.email, owner.password);
    for (const [path, cookie] of [
      ["/", undefined],
      ["/sign-in", undefined],
      ["/kits", session.cookie()],
    ] as const) {
      const { csp, html } = await page(path, cookie);
      const script = directive(csp, "script-src");
      const nonce = /'nonce-([A-Za-z0-9+/=_-]+)'/.exec(script)?.[1];
      expect(nonce, `${path}: ${csp}`).toBeTruthy();
      expect(script, path).not.toContain("'unsafe-inline'");
      // The 3D editor's kernel (WebAssembly) and its Web Worker must still run.
      expect(script).toContain("'wasm-unsafe-eval'");
      expect(directive(csp, "worker-src")).toBe("worker-src 'self' blob:");
      expect(directive(csp, "frame-ancestors")).toBe("frame-ancestors 'none'");
      const tags = scriptTags(html);
      expect(tags.length, path).toBeGreaterThan(0);
      for (const tag of tags) expect(tag, `${path}: ${tag}`).toContain(`nonce="${nonce}"`);
    }
  });

  // ASVS 4.0 V14.4.3 (the nonce must be unguessable: one per response, never reused).
  it("gives each response its own nonce", async () => {
    const nonces = new Set<string>();
    for (let i = 0; i < 3; i++) {
      const { csp } = await page("/");
      const nonce = /'nonce-([^']+)'/.exec(csp)?.[1];
      expect(nonce).toBeTruthy();
      nonces.add(nonce ?? "");
    }
    expect(nonces.size).toBe(3);
  });

  // ASVS 4.0 V14.4.3: exactly one policy per response (two headers would be enforced together).
  it("sends one policy header on a page, not the global one beside it", async () => {
    const r = await fetch(`${baseUrl()}/`);
    const csp = r.headers.get("content-security-policy") ?? "";
    // Headers.get joins repeated headers with ", "; a nonce policy contains no comma of its own.
    expect(csp).not.toContain(",");
    expect(r.headers.get("x-content-type-options")).toBe("nosniff");
  });
});

describe("the part thumbnail keeps its own locked-down policy", () => {
  // ASVS 4.0 V14.4.3 and V12.5.2 (user-derived SVG served so that it cannot run script): the
  // route's own `default-src 'none'; …; sandbox` must reach the browser unchanged and alone.
  it("answers with exactly the route's Content-Security-Policy", async () => {
    const [demo] = await db().select().from(workspaces).where(eq(workspaces.slug, "marrowby"));
    const [part] = await db()
      .select({ id: parts.id })
      .from(parts)
      .where(and(eq(parts.workspaceId, demo?.id ?? ""), isNotNull(parts.thumbnailSvg)))
      .limit(1);
    expect(part).toBeDefined();
    const owner = demoUser("owner");
    const session = await signInOverHttp(owner.email, owner.password);
    const r = await session.fetch(`/api/parts/${part?.id ?? ""}/thumbnail`);
    expect(r.status).toBe(200);
    expect(r.headers.get("content-type")).toBe("image/svg+xml");
    expect(r.headers.get("content-security-policy")).toBe("default-src 'none'; style-src 'unsafe-inline'; sandbox");
  });

  // ASVS 4.0 V14.4.3: API answers carry a deny-all policy of their own (nothing in them should run).
  it("gives other API answers a deny-all policy", async () => {
    const r = await fetch(`${baseUrl()}/api/health`);
    expect(r.headers.get("content-security-policy")).toBe("default-src 'none'; frame-ancestors 'none'");
  });
});
