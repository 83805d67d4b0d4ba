import { mkdirSync } from "node:fs";
import AxeBuilder from "@axe-core/playwright";
import { expect, test, type Page } from "@playwright/test";
import { demoUser } from "./helpers";

// Every page each role can reach, found by following the workspace's own links from where the role
// lands (one page of each route: record ids folded to [id]), checked the way a person meets it:
// - axe-core (Deque's WCAG 2.x rule set, through @axe-core/playwright): no serious or critical violation;
// - no raw code on screen: visible text outside a <details> disclosure, <pre>, <kbd>, form values
//   and literals the user copies ([data-literal]) holds no snake_case word (a code such as `does_not_fit`);
// - nothing wider than a 390 px phone screen (no sideways scrolling of the page itself).
// SLAB_SHOTS=1 also saves full-page screenshots at 1440 × 900, 1024 × 768 and 390 × 844 under
// .data/shots/<role>/ to look at.

const ROLES = ["owner", "designer", "operator", "viewer"] as const;
const SHOTS = process.env.SLAB_SHOTS === "1";
const VIEWPORTS = [
  { width: 1440, height: 900 },
  { width: 1024, height: 768 },
  { width: 390, height: 844 },
];
// Pages that are not pages to audit: downloads, sign-out, the API and the plate map's PDF.
const SKIP = /^\/(api|sign-out|invite)\b|\/download\b|\.pdf$|\/sheet\.pdf/;
const UUID = /[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}/gi;
const routeOf = (path: string) => path.replace(UUID, "[id]").replace(/\/\d+(?=\/|$)/g, "/[n]");

async function signIn(page: Page, role: string) {
  const u = demoUser(role);
  await page.goto("/sign-in");
  const f = page.getByRole("form", { name: "Sign in with a password" });
  await f.getByLabel("E-mail").fill(u.email);
  await f.getByLabel("Password").fill(u.password);
  await f.getByRole("button", { name: "Sign in" }).click();
  // Through /home to the role's own landing page.
  await expect(page).not.toHaveURL(/\/(sign-in|home)\b/);
}

/** Words on screen that look like codes: lower-case words joined by underscores. */
async function rawCodes(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const out = new Set<string>();
    // Inside a disclosure, a code sample (<pre>), keys to press, or a literal the user copies (an API
    // key's prefix, marked data-literal) a code is in its place.
    const hidden = (el: Element) => el.closest("details, pre, kbd, script, style, textarea, [data-literal]") !== null;
    const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
    for (let n = walker.nextNode(); n; n = walker.nextNode()) {
      const el = n.parentElement;
      if (!el || hidden(el)) continue;
      const style = getComputedStyle(el);
      if (style.display === "none" || style.visibility === "hidden") continue;
      for (const m of (n.textContent ?? "").matchAll(/\b[a-z]+(?:_[a-z]+)+\b/g)) out.add(m[0]);
    }
    return [...out];
  });
}

async function settle(page: Page) {
  await page.waitForLoadState("networkidle", { timeout: 15_000 }).catch(() => {});
}

for (const role of ROLES) {
  test(`every page the ${role} can reach passes axe, shows no raw codes and fits a phone`, async ({ browser }) => {
    test.setTimeout(600_000);
    const context = await browser.newContext({ viewport: VIEWPORTS[0] });
    const page = await context.newPage();
    await signIn(page, role);
    const start = new URL(page.url()).pathname;
    const queue = [start, "/overview", "/parts", "/kits", "/templates", "/plates", "/floor", "/floor/history", "/developers", "/settings"];
    const seen = new Set<string>();
    const problems: string[] = [];
    const visited: string[] = [];
    if (SHOTS) mkdirSync(`.data/shots/${role}`, { recursive: true });
    while (queue.length && visited.length < 40) {
      const path = queue.shift()!;
      const route = routeOf(path);
      if (seen.has(route) || SKIP.test(path)) continue;
      seen.add(route);
      await page.setViewportSize(VIEWPORTS[0]!);
      const res = await page.goto(path);
      await settle(page);
      const landed = new URL(page.url()).pathname;
      // A page the role may not see sends it elsewhere or says so; that is not a page of its own.
      if (!res || res.status() >= 400 || routeOf(landed) !== route) continue;
      visited.push(route);

      const axe = await new AxeBuilder({ page }).analyze();
      for (const v of axe.violations.filter((x) => x.impact === "serious" || x.impact === "critical"))
        problems.push(`${route}: axe ${v.impact} ${v.id} (${v.nodes.length}×: ${v.nodes[0]?.target.join(" ")})`);
      for (const code of await rawCodes(page)) problems.push(`${route}: raw code on screen "${code}"`);

      for (const a of await page.locator("a[href^='/']").evaluateAll((els) => els.map((e) => e.getAttribute("href")!))) {
        const p = new URL(a, "http://x").pathname;
        if (!seen.has(routeOf(p)) && !SKIP.test(p)) queue.push(p);
      }

      for (const vp of VIEWPORTS) {
        await page.setViewportSize(vp);
        if (vp.width === 390) {
          const wide = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
          if (wide > 1) problems.push(`${route}: ${wide} px wider than a 390 px phone screen`);
        }
        if (SHOTS) {
          const name = route.replace(/^\//, "").replace(/[^a-z0-9]+/gi, "-") || "home";
          await page.screenshot({ path: `.data/shots/${role}/${name}-${vp.width}.png`, fullPage: true });
        }
      }
    }
    console.log(`${role}: ${visited.length} pages: ${visited.join(", ")}`);
    await context.close();
    expect(visited.length).toBeGreaterThan(3);
    expect(problems).toEqual([]);
  });
}

test("the pages before signing in pass axe, show no raw codes and fit a phone", async ({ page }) => {
  const problems: string[] = [];
  for (const path of ["/", "/pricing", "/sign-in", "/sign-up", "/reset-password"]) {
    await page.setViewportSize(VIEWPORTS[0]!);
    await page.goto(path);
    await settle(page);
    const axe = await new AxeBuilder({ page }).analyze();
    for (const v of axe.violations.filter((x) => x.impact === "serious" || x.impact === "critical"))
      problems.push(`${path}: axe ${v.impact} ${v.id} (${v.nodes.length}×: ${v.nodes[0]?.target.join(" ")})`);
    for (const code of await rawCodes(page)) problems.push(`${path}: raw code on screen "${code}"`);
    await page.setViewportSize(VIEWPORTS[2]!);
    const wide = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
    if (wide > 1) problems.push(`${path}: ${wide} px wider than a 390 px phone screen`);
    if (SHOTS) {
      mkdirSync(".data/shots/public", { recursive: true });
      for (const vp of VIEWPORTS) {
        await page.setViewportSize(vp);
        await page.screenshot({ path: `.data/shots/public/${path.replace(/\W+/g, "-") || "home"}-${vp.width}.png`, fullPage: true });
      }
    }
  }
  expect(problems).toEqual([]);
});
