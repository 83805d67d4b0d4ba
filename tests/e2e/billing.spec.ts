import { expect, test } from "@playwright/test";
import { signInAs } from "./helpers";

// The demo owner moves the shop from Workshop to Farm on the local payment provider's hosted page
// and sees the new plan and its limits once the signed events arrive.
test("the demo owner upgrades through the hosted payment page and sees the new plan and its limits", async ({ page }) => {
  test.setTimeout(90_000);
  await signInAs(page, "owner");
  await page.goto("/settings/billing");
  await expect(page.getByTestId("current-plan")).toHaveText("Workshop");
  await expect(page.getByTestId("plan-limits")).toContainText("of 1,500");
  await page.getByRole("button", { name: /Move to Farm/ }).click();
  // The provider's page (our fake on loopback): pay.
  await expect(page.getByRole("heading", { name: "Farm plan" })).toBeVisible();
  await page.screenshot({ path: ".data/test-results/screenshots/billing-pay-page.png" });
  await page.getByRole("button", { name: /^Pay/ }).click();
  await expect(page).toHaveURL(/\/settings\/billing\?checkout=done/);
  await expect.poll(async () => { await page.reload(); return page.getByTestId("current-plan").textContent(); }, { timeout: 20_000 }).toBe("Farm");
  await expect(page.getByTestId("plan-limits")).toContainText("of 50,000");
  await expect(page.getByTestId("plan-limits")).toContainText("as many as you need");
  await expect(page.getByRole("table", { name: "Invoices" })).toContainText("79.00 EUR");
  await page.screenshot({ path: ".data/test-results/screenshots/billing-farm.png", fullPage: true });
  // The change is in the audit log.
  await page.goto("/settings/audit");
  await expect(page.getByText("plan changed").first()).toBeVisible();
});
