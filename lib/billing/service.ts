import "server-only";
import Stripe from "stripe";
import type { workspaceBilling } from "@/db/schema";
import {
  addPlates,
  billingRow,
  checkoutSessionById,
  latestCheckoutSession,
  completeCheckoutSession,
  endGrace,
  insertBillingEvent,
  insertBillingRow,
  insertCheckoutSession,
  invoiceRows,
  lockBilling,
  lockUsage,
  platesInPeriod,
  setBilling,
  setBillingEventOutcome,
  setCustomer,
  upsertInvoice,
  workspaceOfCustomer,
  type BillingRow,
} from "@/db/queries/billing";
import { transaction, type Tx } from "@/db/queries/tx";
import { systemActor, type WorkspaceActor } from "@/lib/auth/actor";
import { audit } from "@/lib/audit";
import { env, requireSecret } from "@/lib/env";
import { PLANS, type Plan, type PlanId } from "./plans";
import { BadRequest, PlanLimit, Invalid, Unavailable } from "@/lib/errors";

let client: Stripe | undefined;
/** The payments SDK; STRIPE_API_BASE (development, tests) points it at our local fake server. */
export function payments(): Stripe {
  if (client) return client;
  const e = env();
  const base = e.STRIPE_API_BASE ? new URL(e.STRIPE_API_BASE) : null;
  client = new Stripe(
    requireSecret("STRIPE_SECRET_KEY"),
    base
      ? {
          host: base.hostname,
          port: Number(base.port || (base.protocol === "https:" ? 443 : 80)),
          protocol: base.protocol === "https:" ? "https" : "http",
          maxNetworkRetries: 1,
        }
      : { maxNetworkRetries: 2 },
  );
  return client;
}

export type Billing = BillingRow & { effective: Plan };

const monthStart = (d = new Date()) => new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth(), 1));

/** A workspace's billing, with a grace period that has run out turned into the free plan. */
export async function billingOf(actor: WorkspaceActor, tx?: Tx): Promise<Billing> {
  let b = await billingRow(actor, tx);
  if (!b) b = (await insertBillingRow(actor, tx)) ?? (await billingRow(actor, tx))!;
  if (b.status === "grace" && b.graceUntil && b.graceUntil.getTime() < Date.now()) {
    b = await endGrace(actor, tx);
    await audit(
      {
        workspaceId: actor.workspaceId,
        action: "plan_changed",
        details: { to: "bench", reason: "grace period ended after a failed payment" },
      },
      tx,
    );
  }
  return { ...b, effective: PLANS[b.plan] };
}

export function periodStart(b: Billing): Date {
  return b.plan !== "bench" && b.periodStart ? b.periodStart : monthStart();
}

/** Plates the workspace has made in `b`'s current period. */
export async function usageOf(actor: WorkspaceActor, b: Billing, tx?: Tx): Promise<number> {
  return platesInPeriod(actor, periodStart(b), tx);
}

/** Whether a plate's stored options (template and overrides merged) engrave a logo. */
export function engravesLogo(options: unknown): boolean {
  const marks = (options as { marks?: { logo?: unknown } } | null | undefined)?.marks;
  return Boolean(marks?.logo);
}

/**
 * Count one plate against the plan, inside the transaction that stores the plate: past the quota the
 * whole transaction is undone and the caller gets 402 plan_limit. Every path that makes a plate (the
 * API, the editor, a remake, a reprint) comes through here with the plate's options, so the plan's
 * other limits (logos) are checked here too, once.
 */
export async function meterPlate(tx: Tx, actor: WorkspaceActor, count = 1, options?: unknown): Promise<Billing> {
  // One writer at a time per workspace, so two requests cannot both take the last plate.
  await lockUsage(tx, actor);
  const b = await billingOf(actor, tx);
  if (engravesLogo(options) && !b.effective.logos) {
    throw new PlanLimit(
      "plan_limit",
      `Logos come with the Workshop and Farm plans; this workspace is on ${b.effective.name}. Remove the logo, or an owner can ` +
        `upgrade under Settings → Billing.`,
      { plan: b.plan, limit: "logos" },
    );
  }
  const start = periodStart(b);
  const plates = await addPlates(tx, actor, start, count);
  if (plates > b.effective.platesPerPeriod) {
    throw new PlanLimit(
      "plan_limit",
      `This workspace has made its ${b.effective.platesPerPeriod.toLocaleString("en-US")} plates for this billing period on the ` +
        `${b.effective.name} plan. An owner can upgrade under Settings → Billing; the count starts again on ` +
        `${nextPeriod(b, start).toISOString().slice(0, 10)}.`,
      { plan: b.plan, limit: b.effective.platesPerPeriod, used: plates - count },
    );
  }
  return b;
}

function nextPeriod(b: Billing, start: Date): Date {
  if (b.plan !== "bench" && b.periodEnd) return b.periodEnd;
  return new Date(Date.UTC(start.getUTCFullYear(), start.getUTCMonth() + 1, 1));
}

export function buildPriority(plan: PlanId): number {
  return PLANS[plan].buildPriority;
}

/** Checkout for a paid plan: the provider's hosted page, back to the billing page afterwards. */
export async function startCheckout(actor: WorkspaceActor & { email: string }, plan: PlanId): Promise<string> {
  const p = PLANS[plan];
  if (plan === "bench" || !p.priceEnv) throw new Invalid("invalid", "The Bench plan needs no checkout.");
  const b = await billingOf(actor);
  if (b.plan === plan && b.status !== "canceled") throw new Invalid("invalid", `The workspace is on the ${p.name} plan already.`);
  let customer = b.customerId;
  if (!customer) {
    const c = await payments().customers.create({ email: actor.email, metadata: { workspaceId: actor.workspaceId } });
    customer = c.id;
    await setCustomer(actor, customer);
  }
  const back = new URL("/settings/billing", env().AUTH_URL);
  const session = await payments().checkout.sessions.create({
    mode: "subscription",
    customer,
    line_items: [{ price: env()[p.priceEnv], quantity: 1 }],
    success_url: `${back}?checkout=done`,
    cancel_url: `${back}?checkout=cancelled`,
    metadata: { workspaceId: actor.workspaceId, plan },
    subscription_data: { metadata: { workspaceId: actor.workspaceId, plan } },
  });
  // Our own record of the session: the webhook applies a completed checkout only through it.
  await insertCheckoutSession(actor, session.id, plan);
  await audit({
    workspaceId: actor.workspaceId,
    actorUserId: actor.userId,
    actorEmail: actor.email,
    action: "checkout_started",
    details: { plan },
  });
  if (!session.url) throw new Error("the payment provider gave no checkout page");
  return session.url;
}

export async function billingPortal(actor: WorkspaceActor): Promise<string> {
  const b = await billingOf(actor);
  if (!b.customerId) throw new Invalid("invalid", "There is nothing to manage yet: choose a paid plan first.");
  const s = await payments().billingPortal.sessions.create({
    customer: b.customerId,
    return_url: new URL("/settings/billing", env().AUTH_URL).toString(),
  });
  return s.url;
}

const planOfPrice = (price: string | undefined): PlanId | null =>
  price === env().STRIPE_PRICE_WORKSHOP ? "workshop" : price === env().STRIPE_PRICE_FARM ? "farm" : null;
const at = (s: number | null | undefined) => (s ? new Date(s * 1000) : null);

type Obj = Record<string, unknown> & { id?: string; customer?: string | null };
type Outcome =
  "applied" | "duplicate" | "stale" | "ignored" | "unknown_customer" | "unknown_session" | "session_not_complete" | "session_mismatch";

const idOf = (v: string | { id: string } | null | undefined): string | null => (typeof v === "string" ? v : (v?.id ?? null));

/**
 * A completed checkout, checked against our record of the sessions we created and against the
 * provider itself (the session fetched by id with our API key): the workspace and plan come from our
 * record, the customer and subscription from the provider. Nothing is taken from the event's metadata.
 */
async function checkedCheckout(sessionId: string | undefined) {
  if (!sessionId) return { outcome: "unknown_session" as const };
  const record = await checkoutSessionById(sessionId);
  if (!record) return { outcome: "unknown_session" as const };
  const s = await payments().checkout.sessions.retrieve(sessionId);
  // Fulfil only a complete session that is paid (or needs no payment) — from memory of the provider's
  // fulfilment guidance: a completed session can still be "unpaid" with a delayed payment method.
  if (s.status !== "complete" || s.payment_status === "unpaid") return { outcome: "session_not_complete" as const, record };
  return { outcome: "ok" as const, record, customer: idOf(s.customer), subscription: idOf(s.subscription) };
}

/**
 * A signed event from the payment provider. Verified with the SDK; applied at most once (the event
 * id is the key); applied in event-time order (an event older than the last one applied to the
 * workspace is recorded and changes nothing). The workspace is found through what we stored: the
 * checkout session we created (checkout.session.completed) or the customer id (everything else).
 *
 * Events that verify but must not change anything (a checkout we never created, one not paid, an
 * unknown customer) are recorded with their outcome and answered 200: the provider redelivers any
 * other answer for days, and a redelivery cannot change the outcome.
 */
export async function handleBillingEvent(raw: string, signature: string | null): Promise<Outcome> {
  const webhookSecret = env().STRIPE_WEBHOOK_SECRET;
  if (!webhookSecret)
    throw new Unavailable("billing_not_configured", "This server has no STRIPE_WEBHOOK_SECRET: it cannot verify payment events.");
  let event: Stripe.Event;
  try {
    event = payments().webhooks.constructEvent(raw, signature ?? "", webhookSecret);
  } catch (err) {
    throw new BadRequest("bad_signature", `The event's signature does not verify: ${err instanceof Error ? err.message : String(err)}`);
  }
  const obj = event.data.object as unknown as Obj;
  const checkout = event.type === "checkout.session.completed" ? await checkedCheckout(obj.id) : null;
  return transaction(async (tx) => {
    const customer = typeof obj.customer === "string" ? obj.customer : null;
    let workspaceId: string | null = null;
    if (checkout) workspaceId = checkout.record?.workspaceId ?? null;
    else if (customer) workspaceId = await workspaceOfCustomer(tx, customer);
    const created = new Date(event.created * 1000);
    if (!(await insertBillingEvent(tx, { id: event.id, type: event.type, workspaceId, createdAt: created }))) return "duplicate";
    const done = async (outcome: Exclude<Outcome, "duplicate">) => {
      await setBillingEventOutcome(tx, event.id, outcome);
      if (outcome.startsWith("session_") || outcome === "unknown_session")
        console.warn(`billing: event ${event.id} (${event.type}) not applied: ${outcome}`);
      return outcome;
    };
    if (checkout && checkout.outcome !== "ok") return done(checkout.outcome);
    if (!workspaceId) return done("unknown_customer");
    // The provider acts on the workspace our records name: the system, for that workspace.
    const actor = systemActor(workspaceId);
    await lockBilling(tx, actor);
    const b = await billingOf(actor, tx);
    if (b.lastEventAt && created.getTime() < b.lastEventAt.getTime()) return done("stale");
    const set: Partial<typeof workspaceBilling.$inferInsert> = { lastEventAt: created, updatedAt: new Date() };
    let to: PlanId | null = null;
    switch (event.type) {
      case "checkout.session.completed": {
        if (checkout?.outcome !== "ok") return done("unknown_session");
        // The provider's session must belong to the customer we made for this workspace.
        if (b.customerId && checkout.customer !== b.customerId) return done("session_mismatch");
        // this checkout was applied once already (another event id)
        if (!(await completeCheckoutSession(tx, actor, checkout.record.id))) return done("ignored");
        to = checkout.record.plan;
        Object.assign(set, {
          customerId: checkout.customer,
          subscriptionId: checkout.subscription,
          status: "active",
          graceUntil: null,
          plan: to,
        });
        break;
      }
      case "customer.subscription.created":
      case "customer.subscription.updated": {
        const items =
          (obj.items as { data?: { price?: { id?: string }; current_period_start?: number; current_period_end?: number }[] } | undefined)
            ?.data ?? [];
        to = planOfPrice(items[0]?.price?.id);
        const status = obj.status as string;
        Object.assign(set, {
          subscriptionId: obj.id as string,
          ...(to ? { plan: to } : {}),
          periodStart: at((obj.current_period_start as number | undefined) ?? items[0]?.current_period_start),
          periodEnd: at((obj.current_period_end as number | undefined) ?? items[0]?.current_period_end),
          ...(status === "active" ? { status: "active", graceUntil: null } : {}),
        });
        break;
      }
      case "customer.subscription.deleted":
        to = "bench";
        Object.assign(set, {
          plan: "bench",
          status: "canceled",
          subscriptionId: null,
          graceUntil: null,
          periodStart: null,
          periodEnd: null,
        });
        break;
      case "invoice.paid":
      case "invoice.payment_failed": {
        const paid = event.type === "invoice.paid";
        const line = (obj.lines as { data?: { period?: { start?: number; end?: number } }[] } | undefined)?.data?.[0]?.period;
        await upsertInvoice(tx, actor, {
          id: obj.id as string,
          amountCents: Number(paid ? obj.amount_paid : obj.amount_due) || 0,
          currency: String(obj.currency ?? "eur"),
          status: paid ? "paid" : "failed",
          periodStart: at(line?.start ?? (obj.period_start as number)),
          periodEnd: at(line?.end ?? (obj.period_end as number)),
          createdAt: created,
        });
        if (paid) Object.assign(set, { status: "active", graceUntil: null });
        else Object.assign(set, { status: "grace", graceUntil: new Date(Date.now() + env().SLAB_BILLING_GRACE_DAYS * 86_400_000) });
        break;
      }
      default:
        await setBilling(tx, actor, { lastEventAt: b.lastEventAt });
        return done("ignored");
    }
    await setBilling(tx, actor, set);
    await audit(
      {
        workspaceId,
        action: to && to !== b.plan ? "plan_changed" : "billing_event",
        details: { event: event.type, id: event.id, ...(to ? { from: b.plan, to } : {}), ...(set.status ? { status: set.status } : {}) },
      },
      tx,
    );
    return done("applied");
  });
}

/**
 * What became of the newest checkout, for the page the provider sends the owner back to: "pending"
 * until its completion has been applied (the provider's signed event, checked), then "confirmed".
 */
export async function checkoutState(actor: WorkspaceActor): Promise<{ state: "pending" | "confirmed"; plan: PlanId } | null> {
  const record = await latestCheckoutSession(actor);
  if (!record) return null;
  return { state: record.completedAt ? "confirmed" : "pending", plan: record.plan };
}

export async function invoicesOf(actor: WorkspaceActor) {
  return invoiceRows(actor);
}
