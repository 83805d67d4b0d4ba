import { expect, test, type Page } from "@playwright/test";
import { mailTo } from "../support/mail";

/** The newest caught mail to `to`, as whoever runs the demo reads it (npm run outbox), and its first link. */
async function linkFromOutbox(to: string, subject?: RegExp, since?: Date): Promise<string> {
  const mail = await mailTo(to, { subject, since });
  return mail.links[0]!;
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

/** Sign up as a new person would: the form, "check your e-mail", the mailed link, the button. */
async function signUp(page: Page, email: string, password: string) {
  const since = new Date();
  await page.goto("/sign-up");
  const form = page.getByRole("form", { name: "Create an account" });
  await form.getByLabel("Your name").fill("Test Person");
  await form.getByLabel("E-mail").fill(email);
  await form.getByLabel("Password").fill(password);
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(page).toHaveURL(/\/check-email\?for=sign-up$/);
  await expect(page.getByTestId("check-email-text")).toContainText("finish creating your account");
  await page.goto(await linkFromOutbox(email, /Finish creating/, since));
  await page.getByRole("button", { name: "Create my account" }).click();
  // A workshop of their own: its owner lands on the overview.
  await expect(page).toHaveURL(/\/overview$/);
  await expect(page.getByTestId("whoami")).toContainText("Owner");
}

test("signing in by an e-mailed link, which works once", async ({ page }) => {
  test.setTimeout(90_000); // a sign-up now goes through its mailed link
  const email = `link-${Date.now()}@example.com`;
  await signUp(page, email, "a-good-long-password");
  await signOut(page);
  await page.goto("/sign-in");
  const form = page.getByRole("form", { name: "Sign in by e-mail link" });
  await form.getByLabel("E-mail for the link").fill(email);
  await form.getByRole("button", { name: "E-mail me a sign-in link" }).click();
  await expect(page).toHaveURL(/\/check-email/);
  const link = await linkFromOutbox(email, /sign-in link/);
  await page.goto(link);
  await expect(page).toHaveURL(/\/overview$/);
  await signOut(page);
  await page.goto(link);
  await expect(page.getByText("expired or was already used")).toBeVisible();
});

test("resetting a forgotten password", async ({ page }) => {
  test.setTimeout(90_000); // a sign-up now goes through its mailed link
  const email = `reset-${Date.now()}@example.com`;
  await signUp(page, email, "the-first-password");
  await signOut(page);
  await page.goto("/reset-password");
  const ask = page.getByRole("form", { name: "Ask for a reset link" });
  await ask.getByLabel("E-mail").fill(email);
  await ask.getByRole("button", { name: "E-mail me a reset link" }).click();
  await expect(ask.getByTestId("form-message")).toContainText("If an account uses that address");
  const link = await linkFromOutbox(email, /Reset your/);
  await page.goto(link);
  const set = page.getByRole("form", { name: "Choose a new password" });
  await set.getByLabel("E-mail").fill(email);
  await set.getByLabel("New password").fill("the-second-password");
  await set.getByRole("button", { name: "Save and sign in" }).click();
  await expect(page).toHaveURL(/\/overview$/);
  await signOut(page);
  await signInWithPassword(page, email, "the-first-password");
  await expect(page.getByRole("form", { name: "Sign in with a password" }).getByTestId("form-message")).toContainText("do not match");
  await signInWithPassword(page, email, "the-second-password");
  await expect(page).toHaveURL(/\/overview$/);
  // The link was single use.
  await signOut(page);
  await page.goto(link);
  const again = page.getByRole("form", { name: "Choose a new password" });
  await again.getByLabel("E-mail").fill(email);
  await again.getByLabel("New password").fill("the-third-password");
  await again.getByRole("button", { name: "Save and sign in" }).click();
  await expect(again.getByTestId("form-message")).toContainText("already been used");
});

test("wrong passwords slow an account down instead of locking it, and the e-mailed link still lets its owner in", async ({ page }) => {
  test.setTimeout(90_000); // a sign-up now goes through its mailed link
  const email = `guess-${Date.now()}@example.com`;
  await signUp(page, email, "a-password-nobody-guesses");
  await signOut(page);
  let message = "";
  for (let i = 0; i < 14 && !message.includes("Too many"); i++) {
    await signInWithPassword(page, email, `wrong-guess-${i}`);
    const m = page.getByRole("form", { name: "Sign in with a password" }).getByTestId("form-message");
    await expect(m).toBeVisible();
    message = (await m.textContent()) ?? "";
  }
  expect(message).toMatch(/Too many wrong passwords\. Try again in \d+ seconds?, or sign in by e-mailed link/);
  // The owner asks for a link and is in at once.
  const since = new Date();
  const form = page.getByRole("form", { name: "Sign in by e-mail link" });
  await form.getByLabel("E-mail for the link").fill(email);
  await form.getByRole("button", { name: "E-mail me a sign-in link" }).click();
  await expect(page).toHaveURL(/\/check-email/);
  await page.goto(await linkFromOutbox(email, /sign-in link/, since));
  await expect(page).toHaveURL(/\/overview$/);
});

test("signing up with an address that has an account changes nothing and says only: check your e-mail", async ({ page }) => {
  test.setTimeout(90_000); // a sign-up now goes through its mailed link
  const email = `taken-${Date.now()}@example.com`;
  await signUp(page, email, "the-owners-own-password");
  await signOut(page);
  const since = new Date();
  await page.goto("/sign-up");
  const form = page.getByRole("form", { name: "Create an account" });
  await form.getByLabel("Your name").fill("Someone Else");
  await form.getByLabel("E-mail").fill(email);
  await form.getByLabel("Password").fill("a-strangers-password");
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(page).toHaveURL(/\/check-email\?for=sign-up$/);
  await page.screenshot({ path: "test-results/sign-up-check-email.png" });
  await expect(page.getByTestId("whoami")).toHaveCount(0);
  const mail = await mailTo(email, { since });
  expect(mail.subject).toMatch(/tried to create a Slabwright account/);
  await signInWithPassword(page, email, "a-strangers-password");
  await expect(page.getByRole("form", { name: "Sign in with a password" }).getByTestId("form-message")).toContainText("do not match");
  await signInWithPassword(page, email, "the-owners-own-password");
  await expect(page).toHaveURL(/\/overview$/);
});
