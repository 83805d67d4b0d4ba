import { readFileSync } from "node:fs";
import { expect, test, type Page } from "@playwright/test";
import { mailCount, mailTo } from "../support/mail";
import { signInAs } from "./helpers";

type Creds = { users: { email: string; password: string; role: string }[] };
const creds = (): Creds => JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8"));
const user = (role: string) => creds().users.find((u) => u.role === role)!;

/** The owner's password sign-in: the owner lands on the workspace overview. */
async function signIn(page: Page, email: string, password: string) {
  await page.goto("/sign-in");
  const form = page.getByRole("form", { name: "Sign in with a password" });
  await form.getByLabel("E-mail").fill(email);
  await form.getByLabel("Password").fill(password);
  await form.getByRole("button", { name: "Sign in" }).click();
  await expect(page).toHaveURL(/\/overview$/);
}

test("an invited person signs up from the e-mailed link, joins the demo workspace and sees what an operator may do", async ({
  page,
  browser,
}) => {
  test.setTimeout(90_000); // a sign-up now goes through its mailed link
  const owner = user("owner");
  const email = `new-operator-${Date.now()}@example.com`;
  await signIn(page, owner.email, owner.password);
  await page.goto("/settings");
  const invite = page.getByRole("form", { name: "Invite someone" });
  await invite.getByLabel("E-mail").fill(email);
  await invite.getByLabel("Role").selectOption("operator");
  await invite.getByRole("button", { name: "Send invitation" }).click();
  await expect(invite.getByTestId("form-message")).toContainText(`Invitation sent to ${email}`);

  // The mail reaches the fake SMTP server; the owner reads it in the demo outbox.
  await page.goto("/settings/outbox");
  const mail = page.getByTestId("outbox-message").filter({ hasText: email }).first();
  await expect(mail).toBeVisible({ timeout: 10_000 });
  const link = await mail.getByRole("link").first().getAttribute("href");
  expect(link).toMatch(/\/invite\/[A-Za-z0-9_-]{43}$/);

  // A new person, in a browser of their own.
  const other = await browser.newContext();
  const p = await other.newPage();
  await p.goto(link!);
  await expect(p.getByRole("heading", { name: /Join Marrowby Tabletop Co\./ })).toBeVisible();
  await p.getByRole("link", { name: "Create an account to join" }).click();
  const form = p.getByRole("form", { name: "Create an account" });
  await expect(form.getByLabel("E-mail")).toHaveValue(email);
  await form.getByLabel("Your name").fill("Nell Operator");
  // The password rules show at the field before anything is sent.
  await form.getByLabel("Password").fill("short");
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(form.getByTestId("password-error")).toContainText("at least 10");
  await form.getByLabel("Password").fill(email);
  await form.getByRole("button", { name: "Create account" }).click();
  await expect(form.getByTestId("password-error")).toContainText("must not be your e-mail");
  const since = new Date();
  await form.getByLabel("Password").fill("printing-all-night");
  await form.getByRole("button", { name: "Create account" }).click();
  // The address is proven by the link mailed to it before any account exists.
  await expect(p).toHaveURL(/\/check-email\?for=sign-up$/);
  const confirm = (await mailTo(email, { since, subject: /Finish creating/ })).links[0]!;
  await p.goto(confirm);
  await p.getByRole("button", { name: "Create my account" }).click();
  await expect(p).toHaveURL(/\/invite\//);
  await p.getByRole("button", { name: /Join Marrowby/ }).click();
  // An operator lands where the work is: the print floor.
  await expect(p).toHaveURL(/\/floor$/);
  await expect(p.getByTestId("whoami")).toContainText("Operator");
  await p.getByRole("link", { name: "Parts" }).click();
  await p.getByLabel("Search parts").fill("Harbour tile");
  await expect(p.getByTestId("part-Harbour tile")).toBeVisible();
  // An operator sees the members but cannot manage them, keys or the audit log.
  await p.goto("/settings");
  await expect(p.getByTestId(`member-${email}`)).toBeVisible();
  await expect(p.getByRole("form", { name: "Invite someone" })).toHaveCount(0);
  await expect(p.getByText("Only owners can invite people")).toBeVisible();
  await p.goto("/settings/api-keys");
  await expect(p.getByText("Only the workspace's owners can see and manage API keys.")).toBeVisible();

  // The used link does not work twice.
  await p.goto(link!);
  await expect(p.getByTestId("invite-problem")).toContainText("already been used");
  await other.close();
});

test("an owner creates an API key that is shown once, and revokes it", async ({ page, request }) => {
  const owner = user("owner");
  await signIn(page, owner.email, owner.password);
  await page.goto("/settings/api-keys");
  const form = page.getByRole("form", { name: "Create an API key" });
  await form.getByLabel("Name").fill("Playwright order system");
  await form.getByLabel(/kits:read/).check();
  await form.getByRole("button", { name: "Create key" }).click();
  const shown = page.getByTestId("new-key").locator("code").first();
  await expect(shown).toHaveText(/^swk_[0-9a-f]{8}_/);
  const key = (await shown.textContent())!;
  expect((await request.get("/api/v1/kits", { headers: { authorization: `Bearer ${key}` } })).status()).toBe(200);
  await page.reload();
  await expect(page.getByText(key)).toHaveCount(0); // never shown again
  const prefix = key.slice(4, 12);
  page.once("dialog", (d) => d.accept());
  await page.getByTestId(`key-${prefix}`).getByRole("button", { name: "Revoke" }).click();
  await expect(page.getByText("Key revoked")).toBeVisible();
  expect((await request.get("/api/v1/kits", { headers: { authorization: `Bearer ${key}` } })).status()).toBe(401);
});

test("responses carry the security headers", async ({ request }) => {
  const res = await request.get("/");
  const h = res.headers();
  expect(h["content-security-policy"]).toContain("frame-ancestors 'none'");
  expect(h["content-security-policy"]).toContain("'wasm-unsafe-eval'");
  expect(h["content-security-policy"]).toContain("worker-src 'self' blob:");
  expect(h["x-content-type-options"]).toBe("nosniff");
  expect(h["referrer-policy"]).toBe("strict-origin-when-cross-origin");
});

// An owner invites an address twice by mistake: the second time nothing is mailed and the field says
// an invitation is waiting; "Send again" (at the field, then in the waiting list) mails it once each,
// with a new link, and the earlier link stops working.
test("inviting an address that already has a pending invitation sends no second mail until the owner asks to send it again", async ({
  page,
}) => {
  test.setTimeout(60_000);
  const email = `twice-${Date.now()}@example.com`;
  const since = new Date();
  // The day as the app writes it (en-GB, UTC): "3 Dec".
  const today = new Date().toLocaleDateString("en-GB", { day: "numeric", month: "short", timeZone: "UTC" });
  await signInAs(page, "owner");
  await page.goto("/settings");
  const invite = page.getByRole("form", { name: "Invite someone" });
  await invite.getByLabel("E-mail").fill(email);
  await invite.getByLabel("Role").selectOption("operator");
  await invite.getByRole("button", { name: "Send invitation" }).click();
  await expect(invite.getByTestId("form-message")).toContainText(`Invitation sent to ${email}`);
  const first = await mailTo(email, { since, subject: /invited you to/ });
  expect(first.text).toContain("as an operator."); // a/an before a vowel
  expect(await mailCount(email, since)).toBe(1);

  // The same address again: said at the field, nothing mailed.
  await invite.getByLabel("E-mail").fill(email.toUpperCase());
  await invite.getByRole("button", { name: "Send invitation" }).click();
  await expect(invite.getByTestId("email-error")).toHaveText(
    `An invitation to ${email} is already waiting, sent ${today}. Send it again, or withdraw it first to invite with another role.`,
  );
  await expect(invite.getByTestId("form-message")).toHaveText("✕ Nothing was sent.");
  await page.waitForTimeout(1500); // time for a mail to arrive, had one been sent
  expect(await mailCount(email, since)).toBe(1);

  // "Send again" at the field: one more mail, with a new link; the first link no longer works.
  await invite.getByRole("button", { name: "Send again" }).click();
  await expect(invite.getByTestId("form-message")).toContainText(`Invitation sent again to ${email}`);
  await expect.poll(() => mailCount(email, since), { timeout: 10_000 }).toBe(2);
  const second = await mailTo(email, { since, subject: /invited you to/ });
  const [firstLink, secondLink] = [first.links.find((l) => l.includes("/invite/")), second.links.find((l) => l.includes("/invite/"))];
  expect(secondLink).toMatch(/\/invite\/[A-Za-z0-9_-]{43}$/);
  expect(secondLink).not.toBe(firstLink);

  // The waiting list offers it too, with the day it was sent.
  const row = page.getByTestId(`invitation-${email}`);
  await expect(row).toContainText(`sent ${today}`);
  await row.getByRole("button", { name: "Send again" }).click();
  await expect(page.getByTestId("form-message").filter({ hasText: "Invitation sent again" })).toBeVisible();
  await expect.poll(() => mailCount(email, since), { timeout: 10_000 }).toBe(3);
  await expect(page.getByTestId(`invitation-${email}`)).toHaveCount(1);

  // The resends are in the audit log.
  await page.goto("/settings/audit");
  await expect(page.getByRole("table", { name: "Audit log" }).getByRole("row").filter({ hasText: email })).toHaveCount(3);
  await expect(page.getByRole("row").filter({ hasText: `sent the invitation again to ${email}` })).toHaveCount(2);

  await page.goto(firstLink!);
  await expect(page.getByTestId("invite-problem")).toContainText("withdrawn");
});
