import { index, integer, pgTable, primaryKey, text, timestamp } from "drizzle-orm/pg-core";
import { workspaces } from "./workspaces";

/**
 * Billing: each workspace's plan and subscription as the payment provider's events left it, the
 * events themselves (each applied once), invoices, and plates made per billing period.
 */
export const workspaceBilling = pgTable("workspace_billing", {
  workspaceId: text("workspace_id").primaryKey().references(() => workspaces.id, { onDelete: "cascade" }),
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

export const billingEvents = pgTable("billing_events", {
  id: text("id").primaryKey(),
  type: text("type").notNull(),
  workspaceId: text("workspace_id").references(() => workspaces.id, { onDelete: "cascade" }),
  createdAt: timestamp("created_at", { withTimezone: true }).notNull(),
  receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
  /** applied, or why not: stale (older than what was applied), unknown_customer, ignored. */
  outcome: text("outcome").notNull(),
});

export const invoices = pgTable(
  "invoices",
  {
    id: text("id").primaryKey(),
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
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
    workspaceId: text("workspace_id").notNull().references(() => workspaces.id, { onDelete: "cascade" }),
    periodStart: timestamp("period_start", { withTimezone: true }).notNull(),
    plates: integer("plates").notNull().default(0),
  },
  (t) => [primaryKey({ columns: [t.workspaceId, t.periodStart] })],
);
