import type { Metadata } from "next";
import Link from "next/link";
import type { FloorState } from "@/db/schema";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { floorQueue, nextMoves, STATE_LABEL } from "@/lib/floor/service";
import { when } from "@/lib/format";
import { EmptyState, PageHeader } from "../_components/page-header";
import { MoveButtons } from "./_components/floor-controls";

export const metadata: Metadata = { title: "Floor" };

const ORDER: FloorState[] = ["to_print", "printing", "to_inspect", "reprint_needed", "print_failed", "done"];

export default async function FloorPage() {
  const caller = await requireCaller();
  const rows = await floorQueue(caller.workspace.id);
  const mayMove = can(caller.role, "inspections:record");
  return (
    <>
      <PageHeader title="Floor" lead="Every ready plate from the printer to the packing bench. Scan a plate map's QR code to open its inspection. Let the bed cool before lifting a slab." />
      <p className="mb-4 text-sm">
        <Link href="/floor/history" className="text-accent underline">
          First-pass yield and inspection history →
        </Link>
      </p>
      {rows.length === 0 ? <EmptyState message="Nothing on the floor yet: plates appear here as soon as their files are made." /> : null}
      <div className="space-y-6">
        {ORDER.map((state) => {
          const list = rows.filter((r) => r.floorState === state).slice(0, state === "done" ? 15 : 100);
          if (!list.length) return null;
          return (
            <section key={state} aria-labelledby={`floor-${state}`}>
              <h2 id={`floor-${state}`} className="mb-2 text-lg">
                {STATE_LABEL[state]} <span className="font-mono text-sm text-muted">{rows.filter((r) => r.floorState === state).length}</span>
              </h2>
              <ul className="card divide-y divide-hairline" aria-label={STATE_LABEL[state]}>
                {list.map((r) => (
                  <li key={r.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 px-3 py-2 text-sm" data-testid="floor-row">
                    <Link href={`/floor/plates/${r.id}`} className="font-bold hover:underline">
                      {r.kitName ?? r.title ?? "Plate"} <span className="font-mono text-xs font-normal text-muted">{r.id.slice(0, 8)}</span>
                    </Link>
                    <span className="text-muted">{r.pieceCount} pieces</span>
                    {r.source === "reprint" ? <span className="rounded-card bg-paper px-1.5 text-xs">reprint</span> : null}
                    <span className="text-xs text-muted">{r.movedAt ? `moved ${when(r.movedAt)} by ${r.movedBy ?? r.movedByEmail ?? "—"}` : `made ${when(r.createdAt)}`}</span>
                    <span className="ml-auto" />
                    {mayMove ? <MoveButtons id={r.id} from={state} moves={nextMoves(state)} /> : null}
                  </li>
                ))}
              </ul>
            </section>
          );
        })}
      </div>
    </>
  );
}
