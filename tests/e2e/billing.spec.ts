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
  // The page follows the confirmation by itself (no reload), and then says it is confirmed.
  await expect(page.getByTestId("current-plan")).toHaveText("Farm", { timeout: 20_000 });
  await expect(page.getByTestId("checkout-state")).toHaveText(
    "Thank you: the payment is confirmed, and the workspace is on the Farm plan.",
  );
  await expect(page.getByTestId("plan-limits")).toContainText("of 50,000");
  await expect(page.getByTestId("plan-limits")).toContainText("as many as you need");
  // Amounts with their currency sign, as en-GB writes them; the payment's state in words.
  await expect(page.getByRole("table", { name: "Invoices" })).toContainText("€79.00");
  await expect(page.getByRole("table", { name: "Invoices" })).toContainText("✓ paid");
  await expect(page.getByText(/\bEUR\b/)).toHaveCount(0);
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
    await expect(page.getByTestId("make-status")).toHaveAttribute("data-state", "failed");
    await expect(page.getByTestId("make-status")).toContainText(/made its [\d,]+ plates for this billing period/);
    await expect(page.getByTestId("toasts")).toContainText("upgrade under Settings → Billing");
  } finally {
    await client.query(up, [b.workspace_id, start, 0]);
    await client.end();
  }
});

// Back from the provider's page before its confirmation has arrived: the page says it is waiting, not
// that the plan has changed, and turns to "confirmed" by itself once the checkout is applied.
test("back from checkout, the billing page says the payment is being confirmed until it is", async ({ page }) => {
  test.setTimeout(60_000);
  const pg = (await import("pg")).default;
  const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await client.connect();
  const id = `cs_waiting_${Date.now()}`;
  try {
    const { rows } = await client.query("select id from workspaces where slug = 'marrowby'");
    // A checkout of ours the provider has not confirmed yet (what the webhook applies is tested in billing.test.ts).
    await client.query("insert into checkout_sessions (id, workspace_id, plan) values ($1, $2, 'farm')", [id, rows[0].id]);
    await signInAs(page, "owner");
    await page.goto("/settings/billing?checkout=done");
    const state = page.getByTestId("checkout-state");
    await expect(state).toContainText("The payment provider is still confirming your payment for the Farm plan");
    await expect(state).not.toContainText("confirmed, and");
    const plan = await page.getByTestId("current-plan").textContent();
    await page.screenshot({ path: ".data/shots/billing-confirming-1440.png" });
    await client.query("update checkout_sessions set completed_at = now() where id = $1", [id]);
    await expect(state).toHaveText(`Thank you: the payment is confirmed, and the workspace is on the ${plan} plan.`, { timeout: 15_000 });
  } finally {
    await client.query("delete from checkout_sessions where id = $1", [id]);
    await client.end();
  }
});
