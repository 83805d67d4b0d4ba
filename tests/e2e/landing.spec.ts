import { readFileSync } from "node:fs";
import { expect, test } from "@playwright/test";

type Creds = { users: { email: string; password: string; role: string }[] };
const creds = (): Creds => JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8"));

test("the landing page says what the product does and leads to sign-in", async ({ page }) => {
  await page.goto("/");
  await expect(page.getByRole("heading", { level: 1 })).toContainText("slab");
  await expect(page.getByText("carrier slab", { exact: false }).first()).toBeVisible();
  await expect(page.getByText("Before you print")).toBeVisible(); // the safety cautions
  await page.getByRole("link", { name: "Sign in" }).first().click();
  await expect(page).toHaveURL(/\/sign-in$/);
  await expect(page.getByRole("form", { name: "Sign in with a password" }).getByLabel("Password")).toBeVisible();
  await expect(page.getByRole("form", { name: "Sign in by e-mail link" })).toBeVisible();
});

test("the landing page leads to the plans, and the plans to a start: sign up or the demo", async ({ page }) => {
  await page.goto("/");
  await page.getByRole("link", { name: "Plans" }).click();
  await expect(page).toHaveURL(/\/pricing$/);
  await expect(page.getByRole("list", { name: "Plans" })).toContainText("Bench");
  await page.getByTestId("pricing-start").getByRole("link", { name: "Start on Bench, free" }).click();
  await expect(page).toHaveURL(/\/sign-up$/);
  await page.goBack();
  await page.getByTestId("pricing-start").getByRole("link", { name: "Try the demo workshop" }).click();
  await expect(page).toHaveURL(/\/sign-in$/);
});

test("a wrong password is refused with a message at the form, a bad e-mail at the field", async ({ page }) => {
  await page.goto("/sign-in");
  const form = page.getByRole("form", { name: "Sign in with a password" });
  await form.getByLabel("E-mail").fill("not-an-email");
  await form.getByLabel("Password").fill("x");
  await form.getByRole("button", { name: "Sign in" }).click();
  await expect(form.getByTestId("email-error")).toContainText("e-mail address");
  await form.getByLabel("E-mail").fill(creds().users[0]!.email);
  await form.getByLabel("Password").fill("definitely-wrong");
  await form.getByRole("button", { name: "Sign in" }).click();
  await expect(form.getByTestId("form-message")).toContainText("do not match");
});

test("the demo owner signs in, sees the demo parts and kit, and signs out", async ({ page }) => {
  const owner = creds().users.find((u) => u.role === "owner")!;
  await page.goto("/parts");
  await expect(page).toHaveURL(/\/sign-in$/); // signed-out visitors are sent to sign in
  const form = page.getByRole("form", { name: "Sign in with a password" });
  await form.getByLabel("E-mail").fill(owner.email);
  await form.getByLabel("Password").fill(owner.password);
  await form.getByRole("button", { name: "Sign in" }).click();
  // The owner lands on the workspace overview, which links each section it counts.
  await expect(page).toHaveURL(/\/overview$/);
  await expect(page.getByTestId("whoami")).toContainText("Owner");
  await expect(page.getByTestId("overview-tile").filter({ hasText: "Kits" })).toContainText("Open the kits");
  await page.getByRole("link", { name: "Parts" }).click();
  await page.getByLabel("Search parts").fill("Harbour tile");
  await expect(page.getByTestId("part-Harbour tile")).toBeVisible();
  await page.getByLabel("Search parts").fill("Beacon pawn");
  await expect(page.getByTestId("part-Beacon pawn")).toBeVisible();
  await page.getByRole("link", { name: "Kits" }).click();
  await expect(page.getByRole("cell", { name: /Harbour Run token set/ })).toBeVisible();
  await expect(
    page
      .getByRole("row", { name: /Harbour Run/ })
      .getByRole("cell")
      .nth(1),
  ).toHaveText("6");
  await page.getByRole("button", { name: "Sign out" }).click();
  await expect(page).toHaveURL(/\/$/);
  await page.goto("/parts");
  await expect(page).toHaveURL(/\/sign-in$/);
});

test("health answers ok with the version", async ({ request }) => {
  const res = await request.get("/api/health");
  expect(res.status()).toBe(200);
  expect(await res.json()).toMatchObject({ status: "ok", db: "ok", version: expect.any(String) });
});

test("the landing page fits a phone without sideways scrolling @phone", async ({ page }) => {
  await page.goto("/");
  const overflow = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
  expect(overflow).toBeLessThanOrEqual(0);
  await expect(page.getByRole("link", { name: "Sign in" }).first()).toBeVisible();
});
