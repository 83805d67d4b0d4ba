import "server-only";
import { eq, lt, sql } from "drizzle-orm";
import { db } from "@/db";
import { revokedSessions, users, type User } from "@/db/schema";
import type { Tx } from "./tx";

/**
 * People and their sessions: the `users` and `revoked_sessions` tables. A person is not of one
 * workspace, so these take the person, not a workspace actor; they are what the guards read to make
 * one.
 */

export type SessionUser = { id: string; email: string; name: string | null };

/** The person with this address (the whole row, for the password check), or null. */
export async function userByEmail(email: string): Promise<User | null> {
  const [user] = await db().select().from(users).where(eq(users.email, email)).limit(1);
  return user ?? null;
}

/** Whether an address has an account: its id, or null. */
export async function userIdByEmail(email: string): Promise<string | null> {
  const [user] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
  return user?.id ?? null;
}

/** The signed-in person as the pages know them, or null (an account deleted meanwhile). */
export async function sessionUserById(id: string): Promise<SessionUser | null> {
  const [user] = await db().select({ id: users.id, email: users.email, name: users.name }).from(users).where(eq(users.id, id)).limit(1);
  return user ?? null;
}

/** The person's session version (tokens carry it; it moves on when every session is to end), or null. */
export async function sessionVersionOf(userId: string): Promise<number | null> {
  const [row] = await db().select({ v: users.sessionVersion }).from(users).where(eq(users.id, userId));
  return row?.v ?? null;
}

/** The person's password hash: undefined without such a person, null without a password. */
export async function passwordHashOf(userId: string): Promise<string | null | undefined> {
  const [row] = await db().select({ hash: users.passwordHash }).from(users).where(eq(users.id, userId));
  return row ? row.hash : undefined;
}

/** The person with this address, locked for the caller's transaction, or null. */
export async function lockUserByEmail(tx: Tx, email: string): Promise<User | null> {
  const [user] = await tx.select().from(users).where(eq(users.email, email)).for("update");
  return user ?? null;
}

export async function insertUser(
  tx: Tx,
  values: { email: string; name: string; passwordHash: string; emailVerified: Date },
): Promise<User> {
  const [user] = await tx.insert(users).values(values).returning();
  return user!;
}

/** Fill in what an account made by e-mailed link lacks (its first password, its name, its proven address). */
export async function completeUser(
  tx: Tx,
  id: string,
  set: { passwordHash: string | null; name: string | null; emailVerified: Date },
): Promise<User> {
  const [user] = await tx
    .update(users)
    .set({ ...set, updatedAt: new Date() })
    .where(eq(users.id, id))
    .returning();
  return user!;
}

/**
 * A new password, and every session the account had ends (the session version moves on). A reset
 * by e-mailed link also proves the address (`verifyEmail`).
 */
export async function setPassword(tx: Tx, userId: string, passwordHash: string, opts: { verifyEmail?: boolean } = {}): Promise<void> {
  await tx
    .update(users)
    .set(
      opts.verifyEmail
        ? {
            passwordHash,
            sessionVersion: sql`${users.sessionVersion} + 1`,
            emailVerified: sql`coalesce(${users.emailVerified}, now())`,
            updatedAt: new Date(),
          }
        : { passwordHash, sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() },
    )
    .where(eq(users.id, userId));
}

/** End every session of a person: tokens issued before now stop working. */
export async function endSessions(tx: Tx, userId: string): Promise<void> {
  await tx
    .update(users)
    .set({ sessionVersion: sql`${users.sessionVersion} + 1`, updatedAt: new Date() })
    .where(eq(users.id, userId));
}

/** End one session (signing out): kept until the token would have expired on its own. */
export async function revokeSession(sid: string, userId: string | null, expiresAt: Date): Promise<void> {
  await db().insert(revokedSessions).values({ sid, userId, expiresAt }).onConflictDoNothing();
  await db().delete(revokedSessions).where(lt(revokedSessions.expiresAt, new Date()));
}

/** Whether a session token is still good: its person exists, its version is current and it was not signed out. */
export async function sessionStillValid(userId: string, version: number, sid: string): Promise<boolean> {
  const res = await db().execute<{ ok: boolean }>(
    sql`select (u.session_version = ${version} and not exists (select 1 from revoked_sessions r where r.sid = ${sid})) as ok from 
      users u where u.id = ${userId}`,
  );
  return res.rows[0]?.ok === true;
}
