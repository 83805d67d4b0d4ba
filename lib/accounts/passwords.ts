import "server-only";
import { insertPasswordReset, lockPasswordReset, markResetsUsed } from "@/db/queries/account-links";
import { transaction } from "@/db/queries/tx";
import { endSessions, passwordHashOf, setPassword, userIdByEmail, type SessionUser } from "@/db/queries/users";
import { hashPassword, verifyPassword } from "@/lib/auth/password";
import { hit } from "@/lib/auth/rate-limit";
import { hashToken, newToken } from "@/lib/auth/tokens";
import { audit } from "@/lib/audit";
import { Conflict, Invalid } from "@/lib/errors";
import { sendMail } from "@/lib/mail";
import { noAccountResetMessage, passwordResetMessage } from "./mail";

/** Passwords and sessions: reset by e-mailed link, change knowing the present one, sign out everywhere. */

export const RESET_MINUTES = 30;

/** Always the same answer whether or not the account exists, so the form tells nobody who has one. */
export async function requestPasswordReset(email: string, ip: string): Promise<void> {
  const limit = await hit("passwordResetsPerAccount", email);
  if (!limit.ok) return;
  const userId = await userIdByEmail(email);
  if (!userId) {
    // One mail either way, so the time the form takes says nothing about who has an account.
    await sendMail(noAccountResetMessage(email));
    return;
  }
  const { token, hash } = newToken();
  await transaction(async (tx) => {
    await insertPasswordReset(tx, { userId, tokenHash: hash, expiresAt: new Date(Date.now() + RESET_MINUTES * 60_000) });
    await audit({ action: "password_reset_requested", actorUserId: userId, actorEmail: email, ip }, tx);
  });
  await sendMail(passwordResetMessage(email, token, RESET_MINUTES));
}

export async function resetPassword(token: string, email: string, password: string, ip: string): Promise<void> {
  const passwordHash = await hashPassword(password);
  await transaction(async (tx) => {
    const row = await lockPasswordReset(tx, hashToken(token));
    if (!row || row.email.toLowerCase() !== email.toLowerCase())
      throw new Invalid("reset_invalid", "This reset link is not valid for that address. Ask for a new one.");
    if (row.used_at) throw new Conflict("reset_used", "This reset link has already been used. Ask for a new one.");
    if (new Date(row.expires_at).getTime() < Date.now())
      throw new Invalid("reset_expired", "This reset link has expired. Ask for a new one.");
    // A new password ends every session the account had (whoever held them).
    await setPassword(tx, row.user_id, passwordHash, { verifyEmail: true });
    await markResetsUsed(tx, row.user_id);
    await audit({ action: "password_reset", actorUserId: row.user_id, actorEmail: row.email, ip }, tx);
  });
}

/** End every session of a person (sign out everywhere): tokens issued before now stop working. */
export async function endAllSessions(userId: string, ip: string): Promise<void> {
  await transaction(async (tx) => {
    await endSessions(tx, userId);
    await audit({ action: "signed_out_everywhere", actorUserId: userId, ip }, tx);
  });
}

/**
 * Change a password, knowing the present one. Every other session ends; the caller signs in again
 * with the new password to keep this one.
 */
export async function changePassword(user: SessionUser, current: string, password: string, ip: string): Promise<void> {
  if (password.trim().toLowerCase() === user.email.toLowerCase())
    throw new Invalid("invalid", "Your password must not be your e-mail address.", undefined, "password");
  const hash = await passwordHashOf(user.id);
  if (!hash)
    throw new Invalid(
      "no_password",
      "This account signs in by e-mailed link and has no password yet: choose one through “Forgot your password?” on the sign-in page.",
      undefined,
      "current",
    );
  if (!(await verifyPassword(current, hash)))
    throw new Invalid("wrong_password", "That is not your present password.", undefined, "current");
  const passwordHash = await hashPassword(password);
  await transaction(async (tx) => {
    await setPassword(tx, user.id, passwordHash);
    await audit({ action: "password_changed", actorUserId: user.id, actorEmail: user.email, ip }, tx);
  });
}
