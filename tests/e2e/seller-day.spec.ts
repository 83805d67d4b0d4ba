import { mkdirSync } from "node:fs";
import { expect, test, type Page } from "@playwright/test";
import { signInAs } from "./helpers";

// The owner's and the seller's pages at a desktop, a small laptop and a phone: nothing makes the page
// scroll sideways (wide tables scroll inside their own box), and each is kept as a screenshot in
// .data/shots/ for a person to look at.
const SIZES = [
  { name: "1440", width: 1440, height: 900 },
  { name: "1024", width: 1024, height: 768 },
  { name: "390", width: 390, height: 844 },
];

const PAGES = [
  { name: "templates", path: "/templates" },
  { name: "template", path: "" }, // the demo shop's own template, found in the gallery
  { name: "people", path: "/settings" },
  { name: "billing", path: "/settings/billing" },
  { name: "account", path: "/settings/account" },
  { name: "audit", path: "/settings/audit" },
  { name: "api-keys", path: "/settings/api-keys" },
  { name: "developers", path: "/developers" },
];

/** How far the page reaches past the right edge of the window (CSS pixels, 0 when it fits), and the elements that reach out. */
const overflow = (page: Page) =>
  page.evaluate(() => {
    const width = document.documentElement.clientWidth;
    const out = [...document.querySelectorAll("body *")]
      .filter((e) => e.getBoundingClientRect().right > width + 1)
      // Not what a box of its own scrolls or clips: those do not widen the page.
      .filter((e) => {
        for (let a = e.parentElement; a && a !== document.body; a = a.parentElement)
          if (getComputedStyle(a).overflowX !== "visible") return getComputedStyle(e).position === "absolute";
        return true;
      })
      .slice(0, 5)
      .map((e) => `${e.tagName.toLowerCase()}.${[...e.classList].join(".")}`);
    return { by: document.documentElement.scrollWidth - width, out };
  });

test("the owner's and the seller's pages fit a desktop, a laptop and a phone without scrolling sideways", async ({ page }) => {
  test.setTimeout(120_000);
  mkdirSync(".data/shots", { recursive: true });
  await signInAs(page, "owner");
  await page.goto("/templates");
  const template = await page.getByRole("link", { name: "Marrowby thank-you", exact: true }).getAttribute("href");
  expect(template).toMatch(/^\/templates\/.+/);

  for (const size of SIZES) {
    await page.setViewportSize({ width: size.width, height: size.height });
    for (const p of PAGES) {
      await page.goto(p.path || template!);
      await expect(page.getByRole("main")).toBeVisible();
      await page.screenshot({ path: `.data/shots/${p.name}-${size.name}.png`, fullPage: true });
      const o = await overflow(page);
      expect.soft(o.by, `${p.name} at ${size.width} px reaches out by ${o.by} px: ${o.out.join(", ")}`).toBeLessThanOrEqual(0);
    }
  }
  // The words a person reads on the people page: an article that fits the role.
  await page.goto("/settings");
  await expect(page.getByText("you are an owner")).toBeVisible();
});
