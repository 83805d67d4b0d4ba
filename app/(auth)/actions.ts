"use server";

import { AuthError, CredentialsSignin } from "next-auth";
import { z } from "zod";
import { acceptInvitation, createWorkspace, requestPasswordReset, resetPassword, signUpUser } from "@/db/queries/accounts";
import { signIn } from "@/lib/auth/config";
import { loadSessionUser, setActiveWorkspace, UserError } from "@/lib/auth/guards";
import { clientIp } from "@/lib/auth/request";
import { magicLinkSchema, resetConfirmSchema, resetRequestSchema, signInSchema, signUpSchema, workspaceSchema, type ActionResult } from "@/lib/validation/accounts";

const invalid = (error: z.ZodError): ActionResult<never> => ({ ok: false, message: "Check the marked fields.", fieldErrors: z.flattenError(error).fieldErrors as Record<string, string[]> });
const safeNext = (next: unknown) => (typeof next === "string" && /^\/(?!\/)[\w\-/?=&%.]*$/.test(next) ? next : "/parts");

export async function signInWithPassword(input: z.input<typeof signInSchema> & { next?: string }): Promise<ActionResult> {
  const parsed = signInSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  try {
    // On success signIn throws Next's redirect, which must propagate.
    await signIn("credentials", { ...parsed.data, redirectTo: safeNext(input.next) });
  } catch (err) {
    if (err instanceof CredentialsSignin && err.code?.startsWith("rate_limited:")) {
      const minutes = Math.ceil(Number(err.code.split(":")[1]) / 60);
      return { ok: false, code: "rate_limited", message: `Too many attempts. Try again in ${minutes} ${minutes === 1 ? "minute" : "minutes"}.` };
    }
    if (err instanceof AuthError) return { ok: false, code: "bad_credentials", message: "That e-mail and password do not match an account." };
    throw err;
  }
  return { ok: true, data: undefined };
}

export async function sendSignInLink(input: z.input<typeof magicLinkSchema> & { next?: string }): Promise<ActionResult> {
  const parsed = magicLinkSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  try {
    await signIn("nodemailer", { email: parsed.data.email, redirectTo: safeNext(input.next) });
  } catch (err) {
    if (err instanceof AuthError) {
      console.error("[auth] sign-in link not sent", err);
      return { ok: false, message: "The sign-in link could not be sent. Try again, or sign in with your password." };
    }
    throw err;
  }
  return { ok: true, data: undefined };
}

export async function signUp(input: z.input<typeof signUpSchema> & { next?: string }): Promise<ActionResult> {
  const parsed = signUpSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  const invited = typeof input.next === "string" && input.next.startsWith("/invite/");
  try {
    // Someone arriving from an invitation joins that workspace; anyone else gets a workshop of their own.
    await signUpUser({ ...parsed.data, workshop: invited ? undefined : parsed.data.workshop || `${parsed.data.name}'s workshop` }, await clientIp());
  } catch (err) {
    if (err instanceof UserError) return { ok: false, code: err.code, message: err.message, fieldErrors: err.field ? { [err.field]: [err.message] } : undefined };
    throw err;
  }
  await signIn("credentials", { email: parsed.data.email, password: parsed.data.password, redirectTo: safeNext(input.next) });
  return { ok: true, data: undefined };
}

export async function askPasswordReset(input: z.input<typeof resetRequestSchema>): Promise<ActionResult> {
  const parsed = resetRequestSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  try {
    await requestPasswordReset(parsed.data.email, await clientIp());
  } catch (err) {
    console.error("[auth] reset request failed", err);
  }
  return { ok: true, data: undefined, message: "If an account uses that address, a reset link is on its way. It works for 30 minutes." };
}

export async function confirmPasswordReset(input: z.input<typeof resetConfirmSchema>): Promise<ActionResult> {
  const parsed = resetConfirmSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  try {
    await resetPassword(parsed.data.token, parsed.data.email, parsed.data.password, await clientIp());
  } catch (err) {
    if (err instanceof UserError) return { ok: false, code: err.code, message: err.message };
    throw err;
  }
  await signIn("credentials", { email: parsed.data.email, password: parsed.data.password, redirectTo: "/parts" });
  return { ok: true, data: undefined };
}

export async function acceptInvite(input: { token: string }): Promise<ActionResult<{ workspaceId: string }>> {
  const user = await loadSessionUser();
  if (!user) return { ok: false, code: "unauthorized", message: "Sign in first." };
  try {
    const { workspaceId } = await acceptInvitation(user, String(input.token ?? ""));
    await setActiveWorkspace(workspaceId);
    return { ok: true, data: { workspaceId } };
  } catch (err) {
    if (err instanceof UserError) return { ok: false, code: err.code, message: err.message };
    throw err;
  }
}

export async function createFirstWorkspace(input: z.input<typeof workspaceSchema>): Promise<ActionResult<{ workspaceId: string }>> {
  const parsed = workspaceSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  const user = await loadSessionUser();
  if (!user) return { ok: false, code: "unauthorized", message: "Sign in first." };
  const workspaceId = await createWorkspace(user, parsed.data.name);
  await setActiveWorkspace(workspaceId);
  return { ok: true, data: { workspaceId } };
}
