import type { Metadata } from "next";
import Link from "next/link";
import type { ReactNode } from "react";
import { overviewCounts } from "@/db/queries/overview";
import type { FloorState } from "@/db/schema";
import { requireCaller } from "@/lib/auth/guards";
import { STATE_LABEL } from "@/lib/floor/service";
import { billingOf, usageOf } from "@/lib/billing/service";
import { count } from "@/lib/format";
import { plural } from "@/lib/plural";
import { PageHeader } from "../_components/page-header";

export const metadata: Metadata = { title: "Overview" };

const WAITING: FloorState[] = ["to_print", "printing", "to_inspect", "reprint_needed"];

function Tile({ label, value, detail, href, link }: { label: string; value: string; detail?: ReactNode; href: string; link: string }) {
  return (
    <li className="card flex flex-col gap-1 p-4" data-testid="overview-tile">
      <span className="text-sm text-muted">{label}</span>
      <span className="font-mono text-2xl">{value}</span>
      {detail ? <span className="text-xs text-muted">{detail}</span> : null}
      <Link href={href} className="mt-auto pt-2 text-sm text-accent underline">
        {link}
      </Link>
    </li>
  );
}

/** The owner's landing page: what waits on the floor, what the workspace holds, and how much of the plan is used. */
export default async function OverviewPage() {
  const caller = await requireCaller();
  const [c, billing] = await Promise.all([overviewCounts(caller), billingOf(caller)]);
  const used = caller.role === "owner" ? await usageOf(caller, billing) : 0;
  const waiting = WAITING.reduce((n, st) => n + (c.floor[st] ?? 0), 0);
  const owner = caller.role === "owner";
  return (
    <>
      <PageHeader title="Overview" lead={`${caller.workspace.name} at a glance.`} />
      <ul className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3" aria-label="Workspace overview">
        <Tile
          label="Plates waiting on the floor"
          value={count(waiting)}
          detail={WAITING.map((st) => `${count(c.floor[st] ?? 0)} ${STATE_LABEL[st]}`).join(" · ")}
          href="/floor"
          link="Open the floor →"
        />
        <Tile label="Kits" value={count(c.kits)} href="/kits" link="Open the kits →" />
        <Tile
          label="Templates of your own"
          value={count(c.templates)}
          detail="The starter templates are there too."
          href="/templates"
          link="Open the templates →"
        />
        <Tile
          label="People"
          value={count(c.people)}
          detail={c.invited ? `${plural(c.invited, "invitation")} waiting to be accepted` : undefined}
          href="/settings"
          link={owner ? "Invite or change people →" : "See the people →"}
        />
        {owner ? (
          <Tile
            label={`Plates this billing period (${billing.effective.name} plan)`}
            value={`${count(used)} of ${count(billing.effective.platesPerPeriod)}`}
            detail={
              <progress
                className="h-1.5 w-full"
                max={billing.effective.platesPerPeriod}
                value={Math.min(used, billing.effective.platesPerPeriod)}
              />
            }
            href="/settings/billing"
            link="Plan and billing →"
          />
        ) : null}
      </ul>
    </>
  );
}
