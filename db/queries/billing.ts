import "server-only";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { billingEvents, checkoutSessions, invoices, plateUsage, workspaceBilling } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { Tx } from "./tx";

/**
 * Billing: a workspace's plan row, its plate count per period, the checkout sessions we created, the
 * provider's events and invoices — within the actor's workspace, except the two lookups a provider
 * event starts from (our session record by its id, the workspace by its customer id).
 */

type Db = ReturnType<typeof db> | Tx;
export type BillingRow = typeof workspaceBilling.$inferSelect;

export async function billingRow(actor: WorkspaceActor, tx: Db = db()): Promise<BillingRow | null> {
  const [b] = await tx.select().from(workspaceBilling).where(eq(workspaceBilling.workspaceId, actor.workspaceId));
  return b ?? null;
}

/** The workspace's first billing row (the free plan); null when another request made it first. */
export async function insertBillingRow(actor: WorkspaceActor, tx: Db = db()): Promise<BillingRow | null> {
  const [b] = await tx.insert(workspaceBilling).values({ workspaceId: actor.workspaceId }).onConflictDoNothing().returning();
  return b ?? null;
}

/** A grace period that ran out: the workspace is on the free plan now. */
export async function endGrace(actor: WorkspaceActor, tx: Db = db()): Promise<BillingRow> {
  const [b] = await tx
    .update(workspaceBilling)
    .set({ plan: "bench", status: "canceled", graceUntil: null, updatedAt: new Date() })
    .where(eq(workspaceBilling.workspaceId, actor.workspaceId))
    .returning();
  return b!;
}

export async function setBilling(tx: Tx, actor: WorkspaceActor, set: Partial<typeof workspaceBilling.$inferInsert>): Promise<void> {
  await tx.update(workspaceBilling).set(set).where(eq(workspaceBilling.workspaceId, actor.workspaceId));
}

export async function setCustomer(actor: WorkspaceActor, customerId: string): Promise<void> {
  await db().update(workspaceBilling).set({ customerId, updatedAt: new Date() }).where(eq(workspaceBilling.workspaceId, actor.workspaceId));
}

/** Hold the workspace's billing row for the caller's transaction (one event applied at a time). */
export async function lockBilling(tx: Tx, actor: WorkspaceActor): Promise<void> {
  await tx.execute(sql`select 1 from workspace_billing where workspace_id = ${actor.workspaceId} for update`);
}

/** The workspace whose customer id the provider names, or null. */
export async function workspaceOfCustomer(tx: Tx, customerId: string): Promise<string | null> {
  return (
    (await tx.select({ id: workspaceBilling.workspaceId }).from(workspaceBilling).where(eq(workspaceBilling.customerId, customerId)))[0]
      ?.id ?? null
  );
}

// ---------------------------------------------------------------- plate usage

/** Plates made in the period starting `periodStart`. */
export async function platesInPeriod(actor: WorkspaceActor, periodStart: Date, tx: Db = db()): Promise<number> {
  const [u] = await tx
    .select()
    .from(plateUsage)
    .where(and(eq(plateUsage.workspaceId, actor.workspaceId), eq(plateUsage.periodStart, periodStart)));
  return u?.plates ?? 0;
}

/** One counter writer at a time per workspace, until the caller's transaction ends. */
export async function lockUsage(tx: Tx, actor: WorkspaceActor): Promise<void> {
  await tx.execute(sql`select pg_advisory_xact_lock(hashtext(${`usage:${actor.workspaceId}`}))`);
}

/** Count `count` more plates in the period; the new total. */
export async function addPlates(tx: Tx, actor: WorkspaceActor, periodStart: Date, count: number): Promise<number> {
  const [row] = await tx
    .insert(plateUsage)
    .values({ workspaceId: actor.workspaceId, periodStart, plates: count })
    .onConflictDoUpdate({ target: [plateUsage.workspaceId, plateUsage.periodStart], set: { plates: sql`${plateUsage.plates} + ${count}` } })
    .returning();
  return row!.plates;
}

// ---------------------------------------------------------------- checkout sessions and provider events

export async function insertCheckoutSession(actor: WorkspaceActor, id: string, plan: "workshop" | "farm"): Promise<void> {
  await db().insert(checkoutSessions).values({ id, workspaceId: actor.workspaceId, plan });
}

/** Our record of a checkout session, by the id the provider's event names (its workspace comes from the record). */
export async function checkoutSessionById(id: string) {
  const [record] = await db().select().from(checkoutSessions).where(eq(checkoutSessions.id, id));
  return record ?? null;
}

/** The newest checkout session the workspace started (the billing page tells a confirmed one from one still waiting), or null. */
export async function latestCheckoutSession(actor: WorkspaceActor) {
  const [record] = await db()
    .select()
    .from(checkoutSessions)
    .where(eq(checkoutSessions.workspaceId, actor.workspaceId))
    .orderBy(desc(checkoutSessions.createdAt))
    .limit(1);
  return record ?? null;
}

/** Mark a checkout applied; false when it was applied once already. */
export async function completeCheckoutSession(tx: Tx, actor: WorkspaceActor, id: string): Promise<boolean> {
  const [first] = await tx
    .update(checkoutSessions)
    .set({ completedAt: new Date() })
    .where(and(eq(checkoutSessions.id, id), eq(checkoutSessions.workspaceId, actor.workspaceId), isNull(checkoutSessions.completedAt)))
    .returning();
  return Boolean(first);
}

/** Record a provider event as pending; false when it was recorded before (a redelivery). */
export async function insertBillingEvent(
  tx: Tx,
  values: { id: string; type: string; workspaceId: string | null; createdAt: Date },
): Promise<boolean> {
  const inserted = await tx
    .insert(billingEvents)
    .values({ ...values, outcome: "pending" })
    .onConflictDoNothing()
    .returning();
  return inserted.length > 0;
}

export async function setBillingEventOutcome(tx: Tx, id: string, outcome: string): Promise<void> {
  await tx.update(billingEvents).set({ outcome }).where(eq(billingEvents.id, id));
}

export type InvoiceValues = Omit<typeof invoices.$inferInsert, "workspaceId">;

/** An invoice of the workspace, stored or its status changed (a failed one paid later). */
export async function upsertInvoice(tx: Tx, actor: WorkspaceActor, values: InvoiceValues): Promise<void> {
  await tx
    .insert(invoices)
    .values({ ...values, workspaceId: actor.workspaceId })
    .onConflictDoUpdate({ target: invoices.id, set: { status: values.status } });
}

/** The workspace's 50 newest invoices. */
export async function invoiceRows(actor: WorkspaceActor) {
  return db().select().from(invoices).where(eq(invoices.workspaceId, actor.workspaceId)).orderBy(desc(invoices.createdAt)).limit(50);
}
