import { index, jsonb, pgTable, text, timestamp, uniqueIndex } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { apiKeys, roleEnum, workspaces } from "./workspaces";

/** An e-mailed invitation into a workspace. Only a SHA-256 of the token is stored; it works once, until it expires. */
export const invitations = pgTable(
  "invitations",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    email: text("email").notNull(),
    role: roleEnum("role").notNull(),
    tokenHash: text("token_hash").notNull(),
    invitedBy: text("invited_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    acceptedAt: timestamp("accepted_at", { withTimezone: true }),
    acceptedBy: text("accepted_by").references(() => users.id, { onDelete: "set null" }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("invitations_token_key").on(t.tokenHash), index("invitations_workspace_idx").on(t.workspaceId, t.createdAt)],
);

/** Password reset links: hashed token, single use, short-lived. */
export const passwordResets = pgTable(
  "password_resets",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    userId: text("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    tokenHash: text("token_hash").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    usedAt: timestamp("used_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("password_resets_token_key").on(t.tokenHash)],
);

/** Who did what, when, in which workspace. Never holds a password, key or token. */
export const auditEvents = pgTable(
  "audit_events",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    workspaceId: text("workspace_id").references(() => workspaces.id, { onDelete: "cascade" }),
    actorUserId: text("actor_user_id").references(() => users.id, { onDelete: "set null" }),
    actorApiKeyId: text("actor_api_key_id").references(() => apiKeys.id, { onDelete: "set null" }),
    /** The e-mail used, for events without a known user (a failed sign-in). */
    actorEmail: text("actor_email"),
    action: text("action").notNull(),
    target: text("target"),
    ip: text("ip"),
    details: jsonb("details").$type<Record<string, unknown>>(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("audit_events_workspace_idx").on(t.workspaceId, t.createdAt),
    index("audit_events_actor_idx").on(t.actorUserId, t.createdAt),
  ],
);

/**
 * Mail caught by the local fake SMTP server in development and tests: the one place where sign-in
 * and invitation links are stored readable. Never written in a deployment (the fake is off there).
 */
export const devOutbox = pgTable(
  "dev_outbox",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    fromAddress: text("from_address"),
    /** The recipients' bare addresses, lower case, joined by ", ". */
    toAddresses: text("to_addresses").notNull(),
    /** The workspace a message was sent for (its invitations), so that workspace's owners may read it. */
    workspaceId: text("workspace_id"),
    subject: text("subject"),
    text: text("text"),
    html: text("html"),
    receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("dev_outbox_received_idx").on(t.receivedAt)],
);

export type Invitation = typeof invitations.$inferSelect;
export type AuditEvent = typeof auditEvents.$inferSelect;
