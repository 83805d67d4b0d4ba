import { bigint, index, integer, pgTable, primaryKey, text, timestamp, uniqueIndex, varchar } from "drizzle-orm/pg-core";

/** People who sign in. Field names follow what the Auth.js Drizzle adapter reads; columns are snake_case. */
export const users = pgTable(
  "users",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    name: text("name"),
    email: text("email").notNull(),
    emailVerified: timestamp("email_verified", { mode: "date", withTimezone: true }),
    image: text("image"),
    /** bcrypt hash; null for people who only sign in by e-mailed link. */
    passwordHash: text("password_hash"),
    /**
     * Bumped by "sign out everywhere", a password change and a password reset: every session token
     * carries the version it was issued under and is refused once the two differ.
     */
    sessionVersion: integer("session_version").notNull().default(1),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("users_email_key").on(t.email)],
);

export const accounts = pgTable(
  "accounts",
  {
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    type: text("type").notNull(),
    provider: text("provider").notNull(),
    providerAccountId: text("provider_account_id").notNull(),
    refresh_token: text("refresh_token"),
    access_token: text("access_token"),
    expires_at: integer("expires_at"),
    token_type: text("token_type"),
    scope: text("scope"),
    id_token: text("id_token"),
    session_state: text("session_state"),
  },
  (t) => [primaryKey({ columns: [t.provider, t.providerAccountId] })],
);

export const sessions = pgTable("sessions", {
  sessionToken: text("session_token").primaryKey(),
  userId: text("user_id")
    .notNull()
    .references(() => users.id, { onDelete: "cascade" }),
  expires: timestamp("expires", { mode: "date", withTimezone: true }).notNull(),
});

/** Single-use tokens for e-mailed sign-in links (stored hashed by Auth.js). */
export const verificationTokens = pgTable(
  "verification_tokens",
  {
    identifier: text("identifier").notNull(),
    token: text("token").notNull(),
    expires: timestamp("expires", { mode: "date", withTimezone: true }).notNull(),
  },
  (t) => [primaryKey({ columns: [t.identifier, t.token] })],
);

/** Sessions ended by signing out, kept until the token would have expired anyway. */
export const revokedSessions = pgTable(
  "revoked_sessions",
  {
    sid: text("sid").primaryKey(),
    userId: text("user_id").references(() => users.id, { onDelete: "cascade" }),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
  },
  (t) => [index("revoked_sessions_expires_idx").on(t.expiresAt)],
);

/**
 * A sign-up waiting for its address to be proven: nothing is created (no user, no password) until the
 * link mailed to that address is used. Only a SHA-256 of the token is kept.
 */
export const pendingSignUps = pgTable(
  "pending_sign_ups",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    email: text("email").notNull(),
    name: text("name").notNull(),
    passwordHash: text("password_hash").notNull(),
    workshop: text("workshop"),
    /** Where to go once the account exists (an invitation page, say); a path of ours. */
    next: text("next"),
    tokenHash: text("token_hash").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    usedAt: timestamp("used_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("pending_sign_ups_token_key").on(t.tokenHash), index("pending_sign_ups_email_idx").on(t.email)],
);

/** Counters of rate-limiter-flexible (its own layout: key, points, expiry in ms since the epoch). */
export const abuseCounters = pgTable("abuse_counters", {
  key: varchar("key", { length: 255 }).primaryKey(),
  points: integer("points").notNull().default(0),
  expire: bigint("expire", { mode: "number" }),
});

export type User = typeof users.$inferSelect;
