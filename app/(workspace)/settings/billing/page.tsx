import type { Metadata } from "next";
import { requirePermission } from "@/lib/auth/guards";
import { money, PLAN_ORDER, PLANS } from "@/lib/billing/plans";
import { billingOf, checkoutState, invoicesOf, periodStart, usageOf } from "@/lib/billing/service";
import { amount, day } from "@/lib/format";
import { EmptyState } from "../../_components/page-header";
import { PortalButton, RefreshWhileConfirming, UpgradeButton } from "./plan-buttons";

export const metadata: Metadata = { title: "Billing" };

export default async function BillingPage({ searchParams }: { searchParams: Promise<{ checkout?: string }> }) {
  const { caller, allowed } = await requirePermission("billing:manage");
  if (!allowed) return <EmptyState message="Only the workspace's owners see and change its plan." />;
  const b = await billingOf(caller);
  const used = await usageOf(caller, b);
  const invoices = await invoicesOf(caller);
  const { checkout } = await searchParams;
  // Back from the provider's page: what the page says follows our record of that checkout, not the address.
  const returned = checkout === "done" ? await checkoutState(caller) : null;
  const plan = b.effective;
  return (
    <div className="space-y-4">
      {returned?.state === "pending" ? (
        <div className="card border-l-4 border-l-accent p-3 text-sm" data-testid="checkout-state">
          <p>
            Thank you. The payment provider is still confirming your payment for the {PLANS[returned.plan].name} plan; the workspace moves
            to it as soon as the confirmation arrives, usually within a minute. This page updates by itself.
          </p>
          <RefreshWhileConfirming />
        </div>
      ) : null}
      {returned?.state === "confirmed" ? (
        <p className="card border-l-4 border-l-accent p-3 text-sm" data-testid="checkout-state">
          Thank you: the payment is confirmed, and the workspace is on the {plan.name} plan.
        </p>
      ) : null}
      {checkout === "cancelled" ? <p className="card p-3 text-sm text-muted">Checkout cancelled: nothing was charged.</p> : null}
      <section className="card space-y-2 p-4" aria-labelledby="plan-now">
        <h2 id="plan-now" className="text-lg">
          Plan: <span data-testid="current-plan">{plan.name}</span>
        </h2>
        {b.status === "grace" && b.graceUntil ? (
          <p className="text-sm text-finding-error" data-testid="grace">
            <span aria-hidden="true">✕ </span>A payment failed. The {plan.name} plan holds until {day(b.graceUntil)}; if no payment has gone
            through by then, the workspace moves to Bench. Update the payment method under Manage billing.
          </p>
        ) : null}
        <p className="text-sm text-muted">
          {plan.tagline} · {money(plan.monthlyCents)}
        </p>
        <dl className="grid max-w-md grid-cols-2 gap-y-1 text-sm" data-testid="plan-limits">
          <dt className="text-muted">Plates this period</dt>
          <dd className="font-mono">
            {used.toLocaleString("en-GB")} of {plan.platesPerPeriod.toLocaleString("en-GB")}
          </dd>
          <dt className="text-muted">Period from</dt>
          <dd>{day(periodStart(b))}</dd>
          <dt className="text-muted">API keys</dt>
          <dd>{plan.apiKeys === 0 ? "none" : plan.apiKeys >= 1000 ? "as many as you need" : `up to ${plan.apiKeys}`}</dd>
          <dt className="text-muted">Logos on templates</dt>
          <dd>{plan.logos ? "yes" : "no"}</dd>
        </dl>
        <progress
          className="h-1.5 w-full max-w-md"
          max={plan.platesPerPeriod}
          value={Math.min(used, plan.platesPerPeriod)}
          aria-label="Plates used this period"
        />
        <div className="flex flex-wrap gap-2 pt-1">
          {/* With a subscription running, plan changes and cancelling go through the provider's billing portal. */}
          {b.subscriptionId
            ? null
            : PLAN_ORDER.filter((id) => id !== "bench" && id !== b.plan).map((id) => (
                <UpgradeButton
                  key={id}
                  plan={id as "workshop" | "farm"}
                  label={`Move to ${PLANS[id].name} · ${money(PLANS[id].monthlyCents)}`}
                />
              ))}
          {b.customerId ? <PortalButton /> : null}
        </div>
        {b.subscriptionId ? (
          <p className="text-xs text-muted">To change or cancel the plan, or see the card it is paid with, open Manage billing.</p>
        ) : null}
      </section>
      <section className="space-y-2" aria-labelledby="invoices">
        <h2 id="invoices" className="text-lg">
          Invoices
        </h2>
        {invoices.length === 0 ? (
          <p className="text-sm text-muted">No invoices yet.</p>
        ) : (
          <div className="card overflow-x-auto">
            <table className="w-full text-left text-sm" aria-label="Invoices">
              <thead className="border-b border-hairline text-xs text-muted">
                <tr>
                  <th className="px-3 py-2 font-normal">Date</th>
                  <th className="px-3 py-2 font-normal">Amount</th>
                  <th className="px-3 py-2 font-normal">Payment</th>
                  <th className="px-3 py-2 font-normal">Covers</th>
                </tr>
              </thead>
              <tbody>
                {invoices.map((i) => (
                  <tr key={i.id} className="border-b border-hairline last:border-b-0">
                    <td className="whitespace-nowrap px-3 py-2 text-muted">{day(i.createdAt)}</td>
                    <td className="whitespace-nowrap px-3 py-2 font-mono">{amount(i.amountCents, i.currency)}</td>
                    <td className={`px-3 py-2 ${i.status === "failed" ? "text-finding-error" : ""}`}>
                      {i.status === "failed" ? "✕ failed" : "✓ paid"}
                    </td>
                    <td className="whitespace-nowrap px-3 py-2 text-muted">
                      {i.periodStart ? `${day(i.periodStart)} to ${i.periodEnd ? day(i.periodEnd) : "—"}` : "—"}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
    </div>
  );
}
