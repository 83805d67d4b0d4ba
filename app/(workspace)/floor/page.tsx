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

export default async function FloorPage({ searchParams }: { searchParams: Promise<{ q?: string }> }) {
  const caller = await requireCaller();
  const { q = "" } = await searchParams;
  const { counts, lists } = await floorQueue(caller, q);
  const total = Object.values(counts).reduce((a, b) => a + (b ?? 0), 0);
  const mayMove = can(caller.role, "inspections:record");
  return (
    <>
      <PageHeader
        title="Floor"
        lead={
          "Every ready plate from the printer to the packing bench. Scan a plate map's QR code to open its inspection. Let the " +
          "bed cool before lifting a slab."
        }
      />
      <div className="mb-4 flex flex-wrap items-end gap-3">
        <form role="search" action="/floor" className="flex items-end gap-2">
          <label className="text-sm">
            <span className="block text-xs text-muted">Find a plate</span>
            <input
              name="q"
              defaultValue={q}
              className="field-input mt-0.5 w-64 py-1"
              placeholder="plate number (first characters) or kit"
            />
          </label>
          <button type="submit" className="btn-quiet px-3 py-1.5 text-sm">
            Find
          </button>
          {q ? (
            <Link href="/floor" className="text-sm text-accent underline">
              show all
            </Link>
          ) : null}
        </form>
        <Link href="/floor/history" className="ml-auto text-sm text-accent underline">
          First-pass yield and inspection history →
        </Link>
      </div>
      {total === 0 ? (
        <EmptyState
          message={
            q ? `No plate on the floor matches “${q}”.` : "Nothing on the floor yet: plates appear here as soon as their files are made."
          }
        />
      ) : null}
      <div className="space-y-6">
        {ORDER.map((state) => {
          const list = lists[state].slice(0, state === "done" ? 15 : 50);
          const count = counts[state] ?? 0;
          if (!list.length) return null;
          return (
            <section key={state} aria-labelledby={`floor-${state}`}>
              <h2 id={`floor-${state}`} className="mb-2 text-lg">
                {STATE_LABEL[state]} <span className="font-mono text-sm text-muted">{count}</span>
              </h2>
              <ul className="card divide-y divide-hairline" aria-label={STATE_LABEL[state]}>
                {list.map((r) => (
                  <li key={r.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 px-3 py-2 text-sm" data-testid="floor-row">
                    <Link href={`/floor/plates/${r.id}`} className="font-bold hover:underline">
                      {r.kitName ?? r.title ?? "Plate"} <span className="font-mono text-xs font-normal text-muted">{r.id.slice(0, 8)}</span>
                    </Link>
                    <span className="text-muted">{r.pieceCount} pieces</span>
                    {r.source === "reprint" ? <span className="rounded-card bg-paper px-1.5 text-xs">reprint</span> : null}
                    <span className="text-xs text-muted">
                      {r.movedAt ? `moved ${when(r.movedAt)} by ${r.movedBy ?? r.movedByEmail ?? "—"}` : `made ${when(r.createdAt)}`}
                    </span>
                    <span className="ml-auto" />
                    {mayMove ? <MoveButtons id={r.id} from={state} moves={nextMoves(state)} /> : null}
                  </li>
                ))}
              </ul>
              {count > list.length ? (
                <p className="mt-1 text-xs text-muted">
                  {state === "done" ? `the newest ${list.length} of ${count}` : `the ${list.length} waiting longest of ${count}`}
                </p>
              ) : null}
            </section>
          );
        })}
      </div>
    </>
  );
}
