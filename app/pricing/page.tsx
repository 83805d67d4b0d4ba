import type { Metadata } from "next";
import Link from "next/link";
import { money, PLAN_ORDER, PLANS } from "@/lib/billing/plans";

export const metadata: Metadata = { title: "Plans" };

/** Public: the plans and what each allows. */
export default function PricingPage() {
  return (
    <main className="mx-auto max-w-column space-y-6 px-4 py-10">
      <header className="space-y-2">
        <p>
          <Link href="/" className="text-sm text-accent underline">
            ← Slabwright
          </Link>
        </p>
        <h1 className="text-3xl">Plans</h1>
        <p className="text-muted">
          Every plan builds the same slabs with the same checks. They differ in how many plates a month, and whether an order system and a
          logo come with it.
        </p>
      </header>
      <ul className="grid gap-4 md:grid-cols-3" aria-label="Plans">
        {PLAN_ORDER.map((id) => {
          const p = PLANS[id];
          return (
            <li key={id} className="card space-y-2 p-4" data-testid={`plan-${id}`}>
              <h2 className="text-xl">{p.name}</h2>
              <p className="text-sm text-muted">{p.tagline}</p>
              <p className="text-lg font-bold">{money(p.monthlyCents)}</p>
              <ul className="list-disc space-y-0.5 pl-4 text-sm">
                <li>{p.platesPerPeriod.toLocaleString("en-US")} plates a month</li>
                <li>
                  {p.apiKeys === 0
                    ? "no order API"
                    : p.apiKeys >= 1000
                      ? "order API, as many keys as you need"
                      : `order API, up to ${p.apiKeys} keys`}
                </li>
                <li>{p.logos ? "logos on templates" : "templates without logos"}</li>
                {p.buildPriority >= 10 ? <li>its plates built first when the workers are busy</li> : null}
              </ul>
            </li>
          );
        })}
      </ul>
      <div className="flex flex-wrap gap-3" data-testid="pricing-start">
        <Link href="/sign-up" className="btn-primary">
          Start on Bench, free
        </Link>
        <Link href="/sign-in" className="btn-quiet">
          Try the demo workshop
        </Link>
      </div>
      <p className="text-sm text-muted">
        An owner changes the plan under Settings → Billing. Prices include no tax; the local payment page in the demo moves no money.
      </p>
    </main>
  );
}
