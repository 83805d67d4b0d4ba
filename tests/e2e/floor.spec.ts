import { expect, test } from "@playwright/test";
import { signInAs } from "./helpers";

// The operator at the packing bench: floor queue → a plate → piece 3 missing → the reprint → both
// plates' statuses; the plate's maker (the demo designer) has the e-mail in the demo outbox.
test("an operator inspects a plate from the floor queue, marks piece 3 missing and makes the reprint", async ({ browser }) => {
  test.setTimeout(120_000);
  // The designer makes a fresh plate in the slab editor, so the plate has a maker to tell.
  const designer = await browser.newPage({ viewport: { width: 1440, height: 1000 } });
  await signInAs(designer, "designer");
  await designer.goto("/kits");
  await designer
    .getByRole("row", { name: /Harbour Run token set/ })
    .getByRole("link", { name: "Slab editor →" })
    .click();
  await expect(designer.getByTestId("plate-map")).toBeVisible({ timeout: 30_000 });
  await designer.getByRole("button", { name: "Make the plate" }).click();
  await expect(designer.getByTestId("make-status")).toHaveAttribute("data-state", "done", { timeout: 30_000 });
  const plateId = /\/api\/plates\/([^/]+)\/download/.exec(
    (await designer.getByRole("link", { name: "Download STL" }).getAttribute("href"))!,
  )![1]!;
  await designer.close();

  // A phone that scans the sheet's QR code while signed out comes back to the plate after signing in.
  const phone = await browser.newPage({ viewport: { width: 390, height: 844 } });
  await phone.goto(`/floor/plates/${plateId}`);
  await expect(phone).toHaveURL(/\/sign-in\?next=%2Ffloor%2Fplates%2F/);
  await phone.close();

  // The operator, on a tablet-sized screen.
  const page = await browser.newPage({ viewport: { width: 820, height: 1180 } });
  await signInAs(page, "operator");
  // The floor may hold many plates: find this one by the first characters of its number.
  await page.goto("/floor");
  await page.getByLabel("Find a plate").fill(plateId.slice(0, 8));
  await page.getByRole("button", { name: "Find" }).click();
  const row = page
    .getByRole("list", { name: "to print" })
    .getByTestId("floor-row")
    .filter({ hasText: plateId.slice(0, 8) });
  await expect(row).toBeVisible();
  await row.getByRole("button", { name: "Start printing" }).click();
  await expect(
    page
      .getByRole("list", { name: "printing" })
      .getByTestId("floor-row")
      .filter({ hasText: plateId.slice(0, 8) }),
  ).toBeVisible();
  await page
    .getByRole("list", { name: "printing" })
    .getByTestId("floor-row")
    .filter({ hasText: plateId.slice(0, 8) })
    .getByRole("link")
    .click();
  await expect(page.getByTestId("floor-state")).toContainText("printing");
  await expect(page.getByRole("link", { name: "Plate map (PDF, A4)" })).toBeVisible();
  // The files for the slicer are on the plate's page too, for a role that may download them.
  const stlHref = await page.getByTestId("plate-files").getByRole("link", { name: "Download STL" }).getAttribute("href");
  const stlFile = await page.request.get(stlHref!);
  expect(stlFile.status()).toBe(200);
  expect(stlFile.headers()["content-type"]).toBe("model/stl");
  const stlBytes = await stlFile.body();
  // Binary STL: 84 + 50·n bytes, n at byte 80 (the format's published layout).
  expect(stlBytes.byteLength).toBe(84 + 50 * stlBytes.readUInt32LE(80));
  await expect(page.getByTestId("plate-files").getByRole("link", { name: "Download 3MF" })).toBeVisible();

  await page.getByTestId("inspect-piece-3").getByText("missing", { exact: true }).click();
  await page.getByLabel("Note for piece 3").fill("not on the slab when it came off the bed");
  await page.getByRole("button", { name: /Record the inspection \(1 to reprint\)/ }).click();
  await expect(page.getByTestId("floor-state")).toContainText("reprint needed");
  await page.screenshot({ path: ".data/test-results/screenshots/floor-inspection.png", fullPage: true });
  // Past the plan's quota a reprint is refused with the plan's message and the way to upgrade (it is
  // a plate like any other), and nothing is made; back under it, the same button works.
  const pg = (await import("pg")).default;
  const db = new pg.Client({ connectionString: process.env.DATABASE_URL });
  await db.connect();
  const usage = async (plates: number) => {
    const { rows } = await db.query(
      `select b.workspace_id, b.plan, b.period_start from workspace_billing b join workspaces w on w.id = b.workspace_id where ` +
        `w.slug = 'marrowby'`,
    );
    const b = rows[0] as { workspace_id: string; plan: string; period_start: Date | null };
    const now = new Date();
    const start = b.plan !== "bench" && b.period_start ? b.period_start : new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), 1));
    await db.query(
      `insert into plate_usage (workspace_id, period_start, plates) values ($1, $2, $3) on conflict (workspace_id, period_start) do ` +
        `update set plates = excluded.plates`,
      [b.workspace_id, start, plates],
    );
  };
  try {
    await usage(1_000_000);
    await page.getByRole("button", { name: "Make the reprint (1 piece)" }).click();
    await expect(page.getByTestId("floor-notice")).toContainText(/made its [\d,]+ plates for this billing period/);
    await expect(page.getByTestId("floor-notice")).toContainText("An owner can upgrade under Settings → Billing");
    await expect(page.getByTestId("floor-notice")).not.toContainText("Something went wrong");
    await expect(page.getByTestId("floor-state")).toContainText("reprint needed");
    await expect(page.getByTestId("reprint-row")).toHaveCount(0);
  } finally {
    await usage(0);
    await db.end();
  }
  await page.getByRole("button", { name: "Make the reprint (1 piece)" }).click();

  // The reprint's page: it names the original and its status; the original lists the reprint.
  await expect(page.getByTestId("floor-state")).toContainText("reprint of", { timeout: 15_000 });
  await expect(page.getByTestId("floor-state")).toContainText("reprint needed");
  // The page follows the build by itself: no reload.
  await expect(page.getByTestId("floor-state")).toContainText("Status: to print", { timeout: 30_000 });
  await page.getByRole("link", { name: plateId.slice(0, 8) }).click();
  await expect(page.getByTestId("reprint-row")).toContainText("1 piece");
  await expect(page.getByTestId("reprint-row")).toContainText("to print");
  await page.goto(`/floor?q=${plateId.slice(0, 8)}`);
  await expect(
    page
      .getByRole("list", { name: "reprint needed" })
      .getByTestId("floor-row")
      .filter({ hasText: plateId.slice(0, 8) }),
  ).toBeVisible();
  await page.close();

  // The maker's e-mail, read by the owner in the demo outbox.
  const owner = await browser.newPage();
  await signInAs(owner, "owner");
  await owner.goto("/settings/outbox");
  const mail = owner.getByTestId("outbox-message").filter({ hasText: "dario@marrowby.example" }).filter({ hasText: "to reprint" }).first();
  await expect(mail).toBeVisible();
  await owner.close();

  // A viewer sees the plate but no file links (the role may not download them).
  const viewer = await browser.newPage();
  await signInAs(viewer, "viewer");
  await viewer.goto(`/floor/plates/${plateId}`);
  await expect(viewer.getByTestId("floor-state")).toBeVisible();
  await expect(viewer.getByTestId("plate-files")).toHaveCount(0);
  await viewer.close();
});
