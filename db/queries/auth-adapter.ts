import { DrizzleAdapter } from "@auth/drizzle-adapter";
import { db } from "@/db";
import { accounts, sessions, users, verificationTokens } from "@/db/schema";

/**
 * Auth.js's own reads and writes (accounts, sessions, e-mailed sign-in tokens, and the users it
 * makes for a first sign-in by link) go through its Drizzle adapter, on our tables.
 */
export function authAdapter() {
  return DrizzleAdapter(db(), {
    usersTable: users,
    accountsTable: accounts,
    sessionsTable: sessions,
    verificationTokensTable: verificationTokens,
  });
}
