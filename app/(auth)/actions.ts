"use server";

import { AuthError, CredentialsSignin } from "next-auth";
import { z } from "zod";
import { redirect } from "next/navigation";
import { acceptInvitation } from "@/lib/accounts/invitations";
import { createWorkspace } from "@/lib/accounts/members";
import { requestPasswordReset, resetPassword } from "@/lib/accounts/passwords";
import { pendingSignUpByToken, requestSignUp, SIGN_UP_LINK_MESSAGES } from "@/lib/accounts/sign-up";
import { signIn } from "@/lib/auth/config";
import { hit } from "@/lib/auth/rate-limit";
import { loadSessionUser, roleIn, setActiveWorkspace } from "@/lib/auth/guards";
import type { Role } from "@/db/schema";
import { HOME } from "@/lib/auth/landing";
import { clientIp } from "@/lib/auth/request";
import {
  magicLinkSchema,
  resetConfirmSchema,
  resetRequestSchema,
  signInSchema,
  signUpSchema,
  workspaceSchema,
  type ActionResult,
} from "@/lib/validation/accounts";
import { AppError } from "@/lib/errors";

const invalid = (error: z.ZodError): ActionResult<never> => ({
  ok: false,
  message: "Check the marked fields.",
  fieldErrors: z.flattenError(error).fieldErrors as Record<string, string[]>,
});
const wait = (seconds: number) =>
  seconds < 90 ? `${seconds} ${seconds === 1 ? "second" : "seconds"}` : `${Math.ceil(seconds / 60)} minutes`;
const safeNext = (next: unknown) => (typeof next === "string" && /^\/(?!\/)[\w\-/?=&%.]*$/.test(next) ? next : HOME);

export async function signInWithPassword(input: z.input<typeof signInSchema> & { next?: string }): Promise<ActionResult> {
  const parsed = signInSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  try {
    // On success signIn throws Next's redirect, which must propagate.
    await signIn("credentials", { ...parsed.data, redirectTo: safeNext(input.next) });
  } catch (err) {
    if (err instanceof CredentialsSignin && err.code?.startsWith("rate_limited:")) {
      const seconds = Number(err.code.split(":")[1]);
      return {
        ok: false,
        code: "rate_limited",
        message: `Too many wrong passwords. Try again in ${wait(seconds)}, or sign in by e-mailed link, which always works.`,
      };
    }
    if (err instanceof AuthError)
      return { ok: false, code: "bad_credentials", message: "That e-mail and password do not match an account." };
    throw err;
  }
  return { ok: true, data: undefined };
}

/** Mail sent on a form's say-so is limited per client and per address, so nobody's inbox is flooded. */
async function mailAllowed(email: string): Promise<ActionResult | null> {
  const byIp = await hit("mailsPerIp", await clientIp());
  if (!byIp.ok)
    return {
      ok: false,
      code: "rate_limited",
      message: `Too many e-mails asked for from your network. Try again in ${wait(byIp.retryAfter)}.`,
    };
  const byAddress = await hit("mailsPerAddress", email);
  if (!byAddress.ok)
    return {
      ok: false,
      code: "rate_limited",
      message:
        `We sent mail to this address a moment ago. Check your inbox (and spam folder), or try again in ` +
        `${wait(byAddress.retryAfter)}.`,
    };
  return null;
}

export async function sendSignInLink(input: z.input<typeof magicLinkSchema> & { next?: string }): Promise<ActionResult> {
  const parsed = magicLinkSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  // A link is sent whether or not the address has an account, so saying "wait" tells nobody anything.
  const refused = await mailAllowed(parsed.data.email);
  if (refused) return refused;
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

/**
 * Sign-up answers "check your e-mail" whatever the address: a new one gets a link that finishes the
 * account, one that has an account gets a note on how to sign in. Nobody is signed in here.
 */
export async function signUp(input: z.input<typeof signUpSchema> & { next?: string }): Promise<ActionResult> {
  const parsed = signUpSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  const ip = await clientIp();
  const byIp = await hit("signUpsPerIp", ip);
  if (!byIp.ok)
    return { ok: false, code: "rate_limited", message: `Too many sign-ups from your network. Try again in ${wait(byIp.retryAfter)}.` };
  const next = safeNext(input.next);
  const invited = next.startsWith("/invite/");
  // Someone arriving from an invitation joins that workspace; anyone else gets a workshop of their own.
  await requestSignUp(
    { ...parsed.data, workshop: invited ? undefined : parsed.data.workshop || `${parsed.data.name}'s workshop`, next },
    ip,
  );
  redirect("/check-email?for=sign-up");
}

/** The button on the page a sign-up link opens: makes the account and signs its owner in. */
export async function finishSignUpFromLink(input: { token: string }): Promise<ActionResult> {
  const token = typeof input?.token === "string" ? input.token : "";
  const pending = await pendingSignUpByToken(token);
  if (pending.state !== "valid") return { ok: false, code: `sign_up_${pending.state}`, message: SIGN_UP_LINK_MESSAGES[pending.state] };
  try {
    await signIn("sign-up-link", { token, redirectTo: safeNext(pending.next) });
  } catch (err) {
    if (err instanceof AuthError)
      return {
        ok: false,
        code: "sign_up_failed",
        message: "This link could not be used. It may have been used a moment ago; try signing in.",
      };
    throw err;
  }
  return { ok: true, data: undefined };
}

export async function askPasswordReset(input: z.input<typeof resetRequestSchema>): Promise<ActionResult> {
  const parsed = resetRequestSchema.safeParse(input);
  if (!parsed.success) return invalid(parsed.error);
  const byIp = await hit("mailsPerIp", await clientIp());
  if (!byIp.ok)
    return {
      ok: false,
      code: "rate_limited",
      message: `Too many e-mails asked for from your network. Try again in ${wait(byIp.retryAfter)}.`,
    };
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
    if (err instanceof AppError) return { ok: false, code: err.code, message: err.message };
    throw err;
  }
  await signIn("credentials", { email: parsed.data.email, password: parsed.data.password, redirectTo: HOME });
  return { ok: true, data: undefined };
}

export async function acceptInvite(input: { token: string }): Promise<ActionResult<{ workspaceId: string; role: Role }>> {
  const user = await loadSessionUser();
  if (!user) return { ok: false, code: "unauthorized", message: "Sign in first." };
  try {
    const { workspaceId } = await acceptInvitation(user, String(input.token ?? ""));
    await setActiveWorkspace(workspaceId);
    // The role the person now holds there (one who was already a member keeps theirs), for their landing page.
    const role = (await roleIn(workspaceId, user.id)) ?? "viewer";
    return { ok: true, data: { workspaceId, role } };
  } catch (err) {
    if (err instanceof AppError) return { ok: false, code: err.code, message: err.message };
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
