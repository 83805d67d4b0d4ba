import type { Metadata } from "next";
import Link from "next/link";
import { requireCaller } from "@/lib/auth/guards";
import { firstPassYield, kitsWithInspections } from "@/lib/floor/service";
import { PageHeader } from "../../_components/page-header";

export const metadata: Metadata = { title: "Inspection history" };

const pct = (y: number | null) => (y === null ? "—" : `${(y * 100).toFixed(0)} %`);

/** Week-by-week first-pass yield as bars (height = yield), with the counts under each bar. */
function YieldChart({ weeks, label }: { weeks: { week: string; inspected: number; passed: number }[]; label: string }) {
  if (!weeks.length) return <p className="text-sm text-muted">No inspections yet.</p>;
  const w = 36,
    h = 120,
    gap = 10;
  return (
    <svg viewBox={`0 0 ${weeks.length * (w + gap) + 40} ${h + 40}`} className="h-48 w-full max-w-2xl" role="img" aria-label={label}>
      {[0, 0.5, 1].map((t) => (
        <g key={t}>
          <line x1={34} x2={weeks.length * (w + gap) + 40} y1={10 + h * (1 - t)} y2={10 + h * (1 - t)} stroke="#d8d2c6" strokeWidth={0.5} />
          <text x={30} y={13 + h * (1 - t)} fontSize={9} textAnchor="end" fill="#5c6370">
            {t * 100}%
          </text>
        </g>
      ))}
      {weeks.map((wk, i) => {
        const y = wk.inspected ? wk.passed / wk.inspected : 0;
        const x = 40 + i * (w + gap);
        return (
          <g key={wk.week}>
            <rect x={x} y={10 + h * (1 - y)} width={w} height={h * y} fill="#6d4aff" rx={2}>
              <title>{`week of ${wk.week}: ${wk.passed} of ${wk.inspected} first inspections complete`}</title>
            </rect>
            <text x={x + w / 2} y={h + 22} fontSize={8} textAnchor="middle" fill="#5c6370">
              {wk.week.slice(5)}
            </text>
            <text x={x + w / 2} y={h + 33} fontSize={8} textAnchor="middle" fill="#5c6370">
              {wk.passed}/{wk.inspected}
            </text>
          </g>
        );
      })}
    </svg>
  );
}

export default async function HistoryPage() {
  const caller = await requireCaller();
  const all = await firstPassYield(caller);
  const kits = await kitsWithInspections(caller);
  const perKit = await Promise.all(kits.map(async (k) => ({ kit: k, y: await firstPassYield(caller, k.id) })));
  return (
    <>
      <PageHeader
        title="Inspection history"
        lead="First-pass yield: plates whose first inspection found every piece present and none defective, over plates inspected."
      />
      <p className="mb-4 text-sm">
        <a className="text-accent underline" href="/api/floor/inspections.csv">
          Export every inspection (CSV)
        </a>{" "}
        ·{" "}
        <Link className="text-accent underline" href="/floor">
          Back to the floor
        </Link>
      </p>
      <section className="card mb-4 space-y-2 p-4">
        <h2 className="text-base">
          This workspace: <span data-testid="workspace-yield">{pct(all.yield)}</span>{" "}
          <span className="text-sm font-normal text-muted">
            ({all.passed} of {all.inspected} plates)
          </span>
        </h2>
        <YieldChart weeks={all.weeks} label="First-pass yield by week, whole workspace" />
      </section>
      {perKit.map(({ kit, y }) => (
        <section key={kit.id} className="card mb-4 space-y-2 p-4">
          <h2 className="text-base">
            {kit.name}: {pct(y.yield)}{" "}
            <span className="text-sm font-normal text-muted">
              ({y.passed} of {y.inspected} plates)
            </span>
          </h2>
          <YieldChart weeks={y.weeks} label={`First-pass yield by week, ${kit.name}`} />
        </section>
      ))}
    </>
  );
}
