import { readFileSync } from "node:fs";
import { expect, test, type Browser, type Page } from "@playwright/test";

type Creds = { users: { email: string; password: string; role: string }[] };
const owner = () => (JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as Creds).users.find((u) => u.role === "owner")!;

/** Read the newest caught mail to `to` through the owner's demo outbox, and return its first link. */
async function linkFromOutbox(browser: Browser, to: string): Promise<string> {
  const ctx = await browser.newContext();
  const page = await ctx.newPage();
  await signInWithPassword(page, owner().email, owner().password);
  await expect(page).toHaveURL(/\/parts$/);
  await page.goto("/settings/outbox");
  const mail = page.getByTestId("outbox-message").filter({ hasText: to }).first();
  await expect(mail).toBeVisible({ timeout: 10_000 });
  const href = (await mail.getByRole("link").first().getAttribute("href"))!;
  await ctx.close();
  return href;
}

async function signInWithPassword(page: Page, email: string, password: string) {
  await page.goto("/sign-in");
  const form = page.getByRole("form", { name: "Sign in with a password" });
  await form.getByLabel("E-mail").fill(email);
  await form.getByLabel("Password").fill(password);
  await form.getByRole("button", { name: "Sign in" }).click();
}

async function signOut(page: Page) {
  await page.getByRole("button", { name: "Sign out" }).click();
  await expect(page).toHaveURL(/\/$/);
}

async function signUp(page: Page, email: string, password: string) {
  await page.goto("/sign-up");
  const form = page.getByRole("form", { name: "Create an account" });
  await form.getByLabel("Your name").fill("Test Person");
  await form.getByLabel("E-mail").fill(email);
  await form.getByLabel("Password").fill(password);
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(page).toHaveURL(/\/parts$/);
  await expect(page.getByTestId("whoami")).toContainText("Owner"); // a workshop of their own
}

test("signing in by an e-mailed link, which works once", async ({ page, browser }) => {
  const email = `link-${Date.now()}@example.com`;
  await signUp(page, email, "a-good-long-password");
  await signOut(page);
  await page.goto("/sign-in");
  const form = page.getByRole("form", { name: "Sign in by e-mail link" });
  await form.getByLabel("E-mail for the link").fill(email);
  await form.getByRole("button", { name: "E-mail me a sign-in link" }).click();
  await expect(page).toHaveURL(/\/check-email/);
  const link = await linkFromOutbox(browser, email);
  await page.goto(link);
  await expect(page).toHaveURL(/\/parts$/);
  await signOut(page);
  await page.goto(link);
  await expect(page.getByText("expired or was already used")).toBeVisible();
});

test("resetting a forgotten password", async ({ page, browser }) => {
  const email = `reset-${Date.now()}@example.com`;
  await signUp(page, email, "the-first-password");
  await signOut(page);
  await page.goto("/reset-password");
  const ask = page.getByRole("form", { name: "Ask for a reset link" });
  await ask.getByLabel("E-mail").fill(email);
  await ask.getByRole("button", { name: "E-mail me a reset link" }).click();
  await expect(ask.getByTestId("form-message")).toContainText("If an account uses that address");
  const link = await linkFromOutbox(browser, email);
  await page.goto(link);
  const set = page.getByRole("form", { name: "Choose a new password" });
  await set.getByLabel("E-mail").fill(email);
  await set.getByLabel("New password").fill("the-second-password");
  await set.getByRole("button", { name: "Save and sign in" }).click();
  await expect(page).toHaveURL(/\/parts$/);
  await signOut(page);
  await signInWithPassword(page, email, "the-first-password");
  await expect(page.getByRole("form", { name: "Sign in with a password" }).getByTestId("form-message")).toContainText("do not match");
  await signInWithPassword(page, email, "the-second-password");
  await expect(page).toHaveURL(/\/parts$/);
  // The link was single use.
  await signOut(page);
  await page.goto(link);
  const again = page.getByRole("form", { name: "Choose a new password" });
  await again.getByLabel("E-mail").fill(email);
  await again.getByLabel("New password").fill("the-third-password");
  await again.getByRole("button", { name: "Save and sign in" }).click();
  await expect(again.getByTestId("form-message")).toContainText("already been used");
});

test("too many wrong passwords for one account: try again in some minutes", async ({ page }) => {
  const email = `guess-${Date.now()}@example.com`;
  await signUp(page, email, "a-password-nobody-guesses");
  await signOut(page);
  let message = "";
  for (let i = 0; i < 10 && !message.includes("Too many"); i++) {
    await signInWithPassword(page, email, `wrong-guess-${i}`);
    const m = page.getByRole("form", { name: "Sign in with a password" }).getByTestId("form-message");
    await expect(m).toBeVisible();
    message = (await m.textContent()) ?? "";
  }
  expect(message).toMatch(/Too many attempts\. Try again in \d+ minutes?\./);
  // Even the right password waits now.
  await signInWithPassword(page, email, "a-password-nobody-guesses");
  await expect(page.getByRole("form", { name: "Sign in with a password" }).getByTestId("form-message")).toContainText("Too many attempts");
});
