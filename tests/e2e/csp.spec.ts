import { expect, test } from "@playwright/test";
import { signInAs } from "./helpers";

// ASVS 4.0 V14.4.3: with the nonce policy (no 'unsafe-inline' for scripts) every page still runs in
// Chromium, including the slab editor's Web Worker and the geometry kernel's WebAssembly; the browser
// reports no policy violation on the way.
test("pages, the slab editor's worker and its WASM run under the nonce policy without a CSP violation", async ({ page }) => {
  test.setTimeout(60_000);
  const violations: string[] = [];
  page.on("console", (m) => {
    if (/Content Security Policy|Refused to (execute|load|compile|create)/i.test(m.text())) violations.push(m.text());
  });
  const policy = (await page.goto("/"))?.headers()["content-security-policy"] ?? "";
  expect(policy).toMatch(/script-src [^;]*'nonce-/);
  await expect(page.getByRole("link", { name: "Sign in" }).first()).toBeVisible();
  await signInAs(page, "designer");
  await page.goto("/kits");
  await page
    .getByRole("row", { name: /Harbour Run token set/ })
    .getByRole("link", { name: "Slab editor →" })
    .click();
  // The plate map is drawn from the engine's answer in the browser's Web Worker (WASM kernel).
  await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  await expect(page.getByTestId("map-piece-1")).toBeVisible();
  await expect(page.getByTestId("view-3d")).toBeVisible();
  expect(violations).toEqual([]);
});
