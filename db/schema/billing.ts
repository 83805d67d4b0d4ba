import { index, integer, pgTable, primaryKey, text, timestamp } from "drizzle-orm/pg-core";
import { workspaces } from "./workspaces";

/**
 * Billing: each workspace's plan and subscription as the payment provider's events left it, the
 * checkout sessions we created, the events themselves (each applied once), invoices, and plates made
 * per billing period.
 */
export const workspaceBilling = pgTable("workspace_billing", {
  workspaceId: text("workspace_id")
    .primaryKey()
    .references(() => workspaces.id, { onDelete: "cascade" }),
  plan: text("plan").$type<"bench" | "workshop" | "farm">().notNull().default("bench"),
  /** active; grace (a payment failed, the plan holds until grace_until); canceled. */
  status: text("status").$type<"active" | "grace" | "canceled">().notNull().default("active"),
  customerId: text("customer_id").unique(),
  subscriptionId: text("subscription_id").unique(),
  periodStart: timestamp("period_start", { withTimezone: true }),
  periodEnd: timestamp("period_end", { withTimezone: true }),
  graceUntil: timestamp("grace_until", { withTimezone: true }),
  /** Creation time of the newest provider event applied: older ones arriving late change nothing. */
  lastEventAt: timestamp("last_event_at", { withTimezone: true }),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

/**
 * Every checkout session the app created, with the workspace and plan it was made for: a completed
 * checkout is applied only to the workspace in this record, never to one named by the event.
 */
export const checkoutSessions = pgTable(
  "checkout_sessions",
  {
    id: text("id").primaryKey(),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    plan: text("plan").$type<"workshop" | "farm">().notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    /** When its completion was applied (once). */
    completedAt: timestamp("completed_at", { withTimezone: true }),
  },
  (t) => [index("checkout_sessions_workspace_idx").on(t.workspaceId, t.createdAt)],
);

export const billingEvents = pgTable("billing_events", {
  id: text("id").primaryKey(),
  type: text("type").notNull(),
  workspaceId: text("workspace_id").references(() => workspaces.id, { onDelete: "cascade" }),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull(),
  receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
  /**
   * applied, or why not: stale (older than what was applied), unknown_customer, ignored,
   * unknown_session (a checkout we never created), session_not_complete (the provider says it is not
   * paid), session_mismatch (the provider's session belongs to another customer).
   */
  outcome: text("outcome").notNull(),
});

export const invoices = pgTable(
  "invoices",
  {
    id: text("id").primaryKey(),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    amountCents: integer("amount_cents").notNull(),
    currency: text("currency").notNull(),
    status: text("status").$type<"paid" | "failed">().notNull(),
    periodStart: timestamp("period_start", { withTimezone: true }),
    periodEnd: timestamp("period_end", { withTimezone: true }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull(),
  },
  (t) => [index("invoices_workspace_idx").on(t.workspaceId, t.createdAt)],
);

export const plateUsage = pgTable(
  "plate_usage",
  {
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    periodStart: timestamp("period_start", { withTimezone: true }).notNull(),
    plates: integer("plates").notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.workspaceId, t.periodStart] })],
);
