import type { Metadata } from "next";
import { requirePermission } from "@/lib/auth/guards";
import { money, PLAN_ORDER, PLANS } from "@/lib/billing/plans";
import { billingOf, invoicesOf, periodStart, usageOf } from "@/lib/billing/service";
import { when } from "@/lib/format";
import { EmptyState } from "../../_components/page-header";
import { PortalButton, UpgradeButton } from "./plan-buttons";

export const metadata: Metadata = { title: "Billing" };

export default async function BillingPage({ searchParams }: { searchParams: Promise<{ checkout?: string }> }) {
  const { caller, allowed } = await requirePermission("billing:manage");
  if (!allowed) return <EmptyState message="Only the workspace's owners see and change its plan." />;
  const b = await billingOf(caller);
  const used = await usageOf(caller, b);
  const invoices = await invoicesOf(caller);
  const { checkout } = await searchParams;
  const plan = b.effective;
  return (
    <div className="space-y-4">
      {checkout === "done" ? (
        <p className="card border-l-4 border-l-accent p-3 text-sm">
          Thank you: the payment went through. The plan below changes as soon as the payment provider confirms it.
        </p>
      ) : null}
      {checkout === "cancelled" ? <p className="card p-3 text-sm text-muted">Checkout cancelled: nothing was charged.</p> : null}
      <section className="card space-y-2 p-4" aria-labelledby="plan-now">
        <h2 id="plan-now" className="text-lg">
          Plan: <span data-testid="current-plan">{plan.name}</span>
          {b.status === "grace" ? (
            <span className="ml-2 text-sm text-finding-error">payment failed — the plan holds until {when(b.graceUntil)}</span>
          ) : null}
        </h2>
        <p className="text-sm text-muted">
          {plan.tagline} · {money(plan.monthlyCents)}
        </p>
        <dl className="grid max-w-md grid-cols-2 gap-y-1 text-sm" data-testid="plan-limits">
          <dt className="text-muted">Plates this period</dt>
          <dd className="font-mono">
            {used} of {plan.platesPerPeriod.toLocaleString("en-US")}
          </dd>
          <dt className="text-muted">Period from</dt>
          <dd>{periodStart(b).toISOString().slice(0, 10)}</dd>
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
      </section>
      <section className="space-y-2" aria-labelledby="invoices">
        <h2 id="invoices" className="text-lg">
          Invoices
        </h2>
        {invoices.length === 0 ? (
          <p className="text-sm text-muted">No invoices yet.</p>
        ) : (
          <table className="card w-full text-left text-sm" aria-label="Invoices">
            <tbody>
              {invoices.map((i) => (
                <tr key={i.id} className="border-b border-hairline">
                  <td className="px-3 py-2 text-muted">{when(i.createdAt)}</td>
                  <td className="px-3 py-2 font-mono">
                    {(i.amountCents / 100).toFixed(2)} {i.currency.toUpperCase()}
                  </td>
                  <td className={`px-3 py-2 ${i.status === "failed" ? "text-finding-error" : ""}`}>{i.status}</td>
                  <td className="px-3 py-2 text-muted">
                    {i.periodStart ? `${i.periodStart.toISOString().slice(0, 10)} – ${i.periodEnd?.toISOString().slice(0, 10) ?? ""}` : ""}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}
