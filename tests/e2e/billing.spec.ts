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
  await expect
    .poll(
      async () => {
        await page.reload();
        return page.getByTestId("current-plan").textContent();
      },
      { timeout: 20_000 },
    )
    .toBe("Farm");
  await expect(page.getByTestId("plan-limits")).toContainText("of 50,000");
  await expect(page.getByTestId("plan-limits")).toContainText("as many as you need");
  await expect(page.getByRole("table", { name: "Invoices" })).toContainText("79.00 EUR");
  await page.screenshot({ path: ".data/test-results/screenshots/billing-farm.png", fullPage: true });
  // The change is in the audit log.
  await page.goto("/settings/audit");
  await expect(page.getByText("plan changed").first()).toBeVisible();
});

test("at the plan's limit the slab editor says so, with the way to upgrade", async ({ page }) => {
  test.setTimeout(90_000);
  const pg = (await import("pg")).default;
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  // The demo shop's counter for its current period set to far past any plan's quota.
  const { rows } = await client.query(
    `select b.workspace_id, b.plan, b.period_start from workspace_billing b join workspaces w on w.id = b.workspace_id where w.slug ` +
      `= 'marrowby'`,
  );
  const b = rows[0] as { workspace_id: string; plan: string; period_start: Date | null };
  const now = new Date();
  const start = b.plan !== "bench" && b.period_start ? b.period_start : new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), 1));
  const up =
    `insert into plate_usage (workspace_id, period_start, plates) values ($1, $2, $3) on conflict (workspace_id, ` +
    `period_start) do update set plates = excluded.plates`;
  await client.query(up, [b.workspace_id, start, 1_000_000]);
  try {
    await signInAs(page, "designer");
    await page.goto("/kits");
    await page
      .getByRole("row", { name: /Harbour Run token set/ })
      .getByRole("link", { name: "Slab editor →" })
      .click();
    await expect(page.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
    await page.getByRole("button", { name: "Make the plate" }).click();
    await expect(page.getByTestId("make-status")).toContainText("failed");
    await expect(page.getByTestId("make-status")).toContainText(/made its [\d,]+ plates for this billing period/);
    await expect(page.getByTestId("toasts")).toContainText("upgrade under Settings → Billing");
  } finally {
    await client.query(up, [b.workspace_id, start, 0]);
    await client.end();
  }
});
