import "server-only";
import { and, eq, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { passwordResets, pendingSignUps } from "@/db/schema";
import type { Tx } from "./tx";

/**
 * The links mailed for an account: sign-ups waiting for their address to be proven, and password
 * resets. Each is found by the hash of its token alone (whoever holds the link has no session yet).
 */

// ---------------------------------------------------------------- sign-up links

export type PendingSignUpValues = {
  email: string;
  name: string;
  passwordHash: string;
  workshop: string | null;
  next: string | null;
  tokenHash: string;
  expiresAt: Date;
};

/** A newer sign-up for an address replaces the older ones still open. */
export async function closePendingSignUps(tx: Tx, email: string): Promise<void> {
  await tx
    .update(pendingSignUps)
    .set({ usedAt: new Date() })
    .where(and(eq(pendingSignUps.email, email), isNull(pendingSignUps.usedAt)));
}

export async function insertPendingSignUp(tx: Tx, values: PendingSignUpValues): Promise<void> {
  await tx.insert(pendingSignUps).values(values);
}

/** The sign-up a link stands for, or null. */
export async function pendingSignUpByTokenHash(tokenHash: string) {
  const [row] = await db().select().from(pendingSignUps).where(eq(pendingSignUps.tokenHash, tokenHash));
  return row ?? null;
}

export type LockedSignUp = {
  id: string;
  email: string;
  name: string;
  password_hash: string;
  workshop: string | null;
  expires_at: Date;
  used_at: Date | null;
};

/** The sign-up a link stands for, locked for the caller's transaction (it is used once), or null. */
export async function lockPendingSignUp(tx: Tx, tokenHash: string): Promise<LockedSignUp | null> {
  const res = await tx.execute<LockedSignUp>(
    sql`select id, email, name, password_hash, workshop, expires_at, used_at from pending_sign_ups where token_hash = ${tokenHash} 
      for update`,
  );
  return res.rows[0] ?? null;
}

export async function markSignUpUsed(tx: Tx, id: string): Promise<void> {
  await tx.update(pendingSignUps).set({ usedAt: new Date() }).where(eq(pendingSignUps.id, id));
}

// ---------------------------------------------------------------- password reset links

export async function insertPasswordReset(tx: Tx, values: { userId: string; tokenHash: string; expiresAt: Date }): Promise<void> {
  await tx.insert(passwordResets).values(values);
}

export type LockedReset = { id: string; user_id: string; expires_at: Date; used_at: Date | null; email: string };

/** The reset a link stands for, with its account's address, locked for the caller's transaction, or null. */
export async function lockPasswordReset(tx: Tx, tokenHash: string): Promise<LockedReset | null> {
  const res = await tx.execute<LockedReset>(
    sql`select r.id, r.user_id, r.expires_at, r.used_at, u.email from password_resets r join users u on u.id = r.user_id where 
      r.token_hash = ${tokenHash} for update of r`,
  );
  return res.rows[0] ?? null;
}

/** Every reset link of the account is spent once one is used. */
export async function markResetsUsed(tx: Tx, userId: string): Promise<void> {
  await tx.update(passwordResets).set({ usedAt: new Date() }).where(eq(passwordResets.userId, userId));
}
