import "server-only";
import {
  closePendingSignUps,
  insertPendingSignUp,
  lockPendingSignUp,
  markSignUpUsed,
  pendingSignUpByTokenHash,
} from "@/db/queries/account-links";
import { transaction } from "@/db/queries/tx";
import { completeUser, insertUser, lockUserByEmail, userIdByEmail, type SessionUser } from "@/db/queries/users";
import { hashPassword } from "@/lib/auth/password";
import { hit } from "@/lib/auth/rate-limit";
import { hashToken, newToken } from "@/lib/auth/tokens";
import { audit } from "@/lib/audit";
import { Conflict, Invalid } from "@/lib/errors";
import { sendMail } from "@/lib/mail";
import { existingAccountMessage, signUpLinkMessage } from "./mail";
import { createWorkspaceIn } from "./members";

/** Sign-up links work for a day, once. */
export const SIGN_UP_HOURS = 24;

export type SignUpRequest = { name: string; email: string; password: string; workshop?: string; next?: string };

/**
 * Sign-up never creates or changes an account by itself: for a new address it keeps the request and
 * mails a link that finishes it; for an address that already has an account it mails that address
 * how to sign in or reset, and changes nothing. Both paths hash the password and send one mail, so
 * the answer and its timing say nothing about who has an account.
 */
export async function requestSignUp(input: SignUpRequest, ip: string): Promise<void> {
  const passwordHash = await hashPassword(input.password);
  const perAddress = await hit("mailsPerAddress", input.email);
  const existing = await userIdByEmail(input.email);
  if (!perAddress.ok) return; // the same answer; the address has had enough mail for now
  if (existing) {
    await audit({ action: "sign_up_existing_address", actorUserId: existing, actorEmail: input.email, ip });
    await sendMail(existingAccountMessage(input.email));
    return;
  }
  const { token, hash } = newToken();
  await transaction(async (tx) => {
    // A newer request for the same address replaces the older one.
    await closePendingSignUps(tx, input.email);
    await insertPendingSignUp(tx, {
      email: input.email,
      name: input.name,
      passwordHash,
      workshop: input.workshop ?? null,
      next: input.next ?? null,
      tokenHash: hash,
      expiresAt: new Date(Date.now() + SIGN_UP_HOURS * 3600_000),
    });
    await audit({ action: "sign_up_requested", actorEmail: input.email, ip }, tx);
  });
  await sendMail(signUpLinkMessage(input.email, input.name, token, SIGN_UP_HOURS));
}

export type SignUpLinkState = "valid" | "expired" | "used" | "unknown";

/** What the page a sign-up link opens says when the link cannot be used. */
export const SIGN_UP_LINK_MESSAGES: Record<Exclude<SignUpLinkState, "valid">, string> = {
  unknown: "This link is not valid. Check that you opened the whole link from the e-mail.",
  expired: "This link has expired. Sign up again to get a new one.",
  used: "This link has already been used. Sign in with your e-mail and password.",
};

/** What a sign-up link stands for, without using it. */
export async function pendingSignUpByToken(token: string): Promise<{ state: SignUpLinkState; email: string | null; next: string | null }> {
  const row = await pendingSignUpByTokenHash(hashToken(token));
  if (!row) return { state: "unknown", email: null, next: null };
  const state: SignUpLinkState = row.usedAt ? "used" : row.expiresAt.getTime() < Date.now() ? "expired" : "valid";
  return { state, email: row.email, next: row.next };
}

/**
 * Use a sign-up link: the account is made now, with the name, password and workshop given at
 * sign-up, its address proven by the link. If someone made an account for the address meanwhile
 * (by an e-mailed sign-in link), the link may give it its first password, never replace one.
 */
export async function finishSignUp(token: string, ip: string): Promise<SessionUser & { sessionVersion: number }> {
  return transaction(async (tx) => {
    const p = await lockPendingSignUp(tx, hashToken(token));
    if (!p) throw new Invalid("sign_up_unknown", SIGN_UP_LINK_MESSAGES.unknown);
    if (p.used_at) throw new Conflict("sign_up_used", SIGN_UP_LINK_MESSAGES.used);
    if (new Date(p.expires_at).getTime() < Date.now()) throw new Invalid("sign_up_expired", SIGN_UP_LINK_MESSAGES.expired);
    await markSignUpUsed(tx, p.id);
    const existing = await lockUserByEmail(tx, p.email);
    const user = existing
      ? await completeUser(tx, existing.id, {
          passwordHash: existing.passwordHash ?? p.password_hash,
          name: existing.name ?? p.name,
          emailVerified: existing.emailVerified ?? new Date(),
        })
      : await insertUser(tx, { email: p.email, name: p.name, passwordHash: p.password_hash, emailVerified: new Date() });
    await audit({ action: "sign_up", actorUserId: user.id, actorEmail: p.email, ip }, tx);
    if (p.workshop && !existing) await createWorkspaceIn(tx, user.id, p.workshop);
    return { id: user.id, email: user.email, name: user.name, sessionVersion: user.sessionVersion };
  });
}
