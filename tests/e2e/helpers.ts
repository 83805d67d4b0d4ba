import { readFileSync } from "node:fs";
import { expect, type Page } from "@playwright/test";
import type { Role } from "../../db/schema";
import { LANDING } from "../../lib/auth/landing";

type Creds = { users: { email: string; password: string; role: string }[] };

export function demoUser(role: string): { email: string; password: string } {
  const creds = JSON.parse(readFileSync(process.env.SLAB_CREDENTIALS_FILE ?? ".data/demo-credentials.test.json", "utf8")) as Creds;
  return creds.users.find((u) => u.role === role)!;
}

/** Sign in as a demo user with the password form and wait for the role's landing page (where its work is). */
export async function signInAs(page: Page, role: string) {
  const u = demoUser(role);
  await page.goto("/sign-in");
  const f = page.getByRole("form", { name: "Sign in with a password" });
  await f.getByLabel("E-mail").fill(u.email);
  await f.getByLabel("Password").fill(u.password);
  await f.getByRole("button", { name: "Sign in" }).click();
  await expect(page).toHaveURL(new RegExp(`${LANDING[role as Role]}$`));
}
