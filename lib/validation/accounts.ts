import { z } from "zod";
import { apiKeyScopes } from "@/db/schema/workspaces";

/** Shared by the forms (react-hook-form's resolver) and the server actions, so both say the same. */
export const PASSWORD_MIN = 10;

export const emailField = z.string().trim().toLowerCase().email("Enter an e-mail address like name@example.com.").max(254);

export const passwordField = z
  .string()
  .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
  .max(200, "Use at most 200 characters.");

const notTheEmail = <T extends { email: string; password: string }>(v: T) =>
  v.password.trim().toLowerCase() !== v.email.trim().toLowerCase();

export const signInSchema = z.object({ email: emailField, password: z.string().min(1, "Enter your password.") });
export const magicLinkSchema = z.object({ email: emailField });

export const signUpSchema = z
  .object({
    name: z.string().trim().min(1, "Enter your name.").max(80),
    email: emailField,
    password: passwordField,
    workshop: z.string().trim().max(80).optional(),
  })
  .refine(notTheEmail, { path: ["password"], message: "Your password must not be your e-mail address." });

export const resetRequestSchema = z.object({ email: emailField });
export const resetConfirmSchema = z
  .object({ token: z.string().min(20).max(200), email: emailField, password: passwordField })
  .refine(notTheEmail, { path: ["password"], message: "Your password must not be your e-mail address." });

export const changePasswordSchema = z.object({
  current: z.string().min(1, "Enter your present password.").max(200),
  password: passwordField,
});

export const roleField = z.enum(["owner", "designer", "operator", "viewer"]);
export const inviteSchema = z.object({ email: emailField, role: roleField });
export const resendInviteSchema = z.object({ email: emailField });
export const changeRoleSchema = z.object({ userId: z.string().min(1), role: roleField });
export const memberSchema = z.object({ userId: z.string().min(1) });
export const idSchema = z.object({ id: z.string().min(1).max(100) });

export const workspaceSchema = z.object({ name: z.string().trim().min(2, "Name it with at least 2 characters.").max(80) });

export const apiKeySchema = z.object({
  name: z.string().trim().min(1, "Name the key after the system that will use it.").max(80),
  scopes: z.array(z.enum(apiKeyScopes)).min(1, "Choose at least one scope."),
});

export type FieldErrors = Record<string, string[] | undefined>;
export type ActionResult<T = undefined> =
  { ok: true; data: T; message?: string } | { ok: false; message: string; fieldErrors?: FieldErrors; code?: string };
