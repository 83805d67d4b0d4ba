import type { Metadata } from "next";
import Link from "next/link";
import { FLOOR_STATES, type FloorState } from "@/db/schema";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import { FLOOR_PAGE, FLOOR_SORTS, floorFilterChoices, floorQueue, nextMoves, STATE_LABEL, type FloorSort } from "@/lib/floor/service";
import { count, when } from "@/lib/format";
import { plateName } from "@/lib/plates/name";
import { plural } from "@/lib/plural";
import { EmptyState, PageHeader } from "../_components/page-header";
import { FloorNoticeLine, FloorNotices, MoveButtons } from "./_components/floor-controls";

export const metadata: Metadata = { title: "Floor" };

const ORDER: FloorState[] = ["to_print", "printing", "to_inspect", "reprint_needed", "print_failed", "done"];

const SORT_LABEL: Record<FloorSort, string> = {
  waiting: "Waiting longest first",
  newest: "Newest first",
  reference: "Order reference, A to Z",
};

/** The URL parameter that holds a state's page number: ?to-print=2. */
const pageParam = (state: FloorState) => state.replace(/_/g, "-");

type Params = { q?: string; kit?: string; template?: string; sort?: string } & Record<string, string | undefined>;

export default async function FloorPage({ searchParams }: { searchParams: Promise<Params> }) {
  const caller = await requireCaller();
  const params = await searchParams;
  const q = params.q ?? "";
  const kit = params.kit || undefined;
  const template = params.template || undefined;
  const sort: FloorSort = (FLOOR_SORTS as readonly string[]).includes(params.sort ?? "") ? (params.sort as FloorSort) : "waiting";
  const pages = Object.fromEntries(FLOOR_STATES.map((s) => [s, Number(params[pageParam(s)]) || 1])) as Record<FloorState, number>;
  const [{ counts, lists }, choices] = await Promise.all([
    floorQueue(caller, { term: q, kitId: kit, templateId: template, sort, pages }),
    floorFilterChoices(caller),
  ]);
  const total = Object.values(counts).reduce((a, b) => a + (b ?? 0), 0);
  const mayMove = can(caller.role, "inspections:record");
  const filtered = Boolean(q || kit || template);
  /** This page's address with some parameters changed (a state's page, the sort…). */
  const href = (change: Record<string, string | number | undefined>) => {
    const u = new URLSearchParams();
    const all: Record<string, string | number | undefined> = {
      q: q || undefined,
      kit,
      template,
      sort: sort === "waiting" ? undefined : sort,
    };
    for (const s of FLOOR_STATES) all[pageParam(s)] = pages[s] > 1 ? pages[s] : undefined;
    for (const [k, v] of Object.entries({ ...all, ...change })) if (v !== undefined && v !== "" && v !== 1) u.set(k, String(v));
    const s = u.toString();
    return s ? `/floor?${s}` : "/floor";
  };
  return (
    <FloorNotices>
      <PageHeader
        title="Floor"
        lead={
          "Every ready plate from the printer to the packing bench. Scan a plate map's QR code to open its inspection. Let the " +
          "bed cool before lifting a slab."
        }
      />
      <div className="mb-4 flex flex-wrap items-end gap-3">
        <form role="search" action="/floor" className="flex flex-wrap items-end gap-2" aria-label="Find and sort plates">
          <label className="text-sm">
            <span className="block text-xs text-muted">Find a plate</span>
            <input
              name="q"
              defaultValue={q}
              className="field-input mt-0.5 w-64 max-w-full py-1 text-sm"
              placeholder="order reference, plate number or kit"
            />
          </label>
          <label className="text-sm">
            <span className="block text-xs text-muted">Kit</span>
            <select name="kit" defaultValue={kit ?? ""} className="field-input mt-0.5 py-1 text-sm">
              <option value="">every kit</option>
              {choices.kits.map((k) => (
                <option key={k.id} value={k.id}>
                  {k.name}
                </option>
              ))}
            </select>
          </label>
          <label className="text-sm">
            <span className="block text-xs text-muted">Template</span>
            <select name="template" defaultValue={template ?? ""} className="field-input mt-0.5 py-1 text-sm">
              <option value="">every template</option>
              {choices.templates.map((t) => (
                <option key={t.id} value={t.id}>
                  {t.name}
                </option>
              ))}
            </select>
          </label>
          <label className="text-sm">
            <span className="block text-xs text-muted">Sort</span>
            <select name="sort" defaultValue={sort} className="field-input mt-0.5 py-1 text-sm">
              {FLOOR_SORTS.map((s) => (
                <option key={s} value={s}>
                  {SORT_LABEL[s]}
                </option>
              ))}
            </select>
          </label>
          <button type="submit" className="btn-quiet px-3 py-1.5 text-sm">
            Find
          </button>
          {filtered || sort !== "waiting" ? (
            <Link href="/floor" className="pb-1.5 text-sm text-accent underline">
              show all
            </Link>
          ) : null}
        </form>
        <Link href="/floor/history" className="ml-auto pb-1.5 text-sm text-accent underline">
          First-pass yield and inspection history →
        </Link>
      </div>
      <FloorNoticeLine />
      {total === 0 ? (
        <EmptyState
          message={
            filtered
              ? `No plate on the floor matches${q ? ` “${q}”` : " these filters"}.`
              : "Nothing on the floor yet: plates appear here as soon as their files are made."
          }
        />
      ) : null}
      <div className="space-y-6">
        {ORDER.map((state) => {
          const { page, rows } = lists[state];
          const n = counts[state] ?? 0;
          if (!rows.length) return null;
          const first = (page - 1) * FLOOR_PAGE + 1;
          const lastShown = first + rows.length - 1;
          const pagesInAll = Math.ceil(n / FLOOR_PAGE);
          return (
            <section key={state} aria-labelledby={`floor-${state}`}>
              <h2 id={`floor-${state}`} className="mb-2 text-lg">
                {STATE_LABEL[state]} <span className="font-mono text-sm text-muted">{count(n)}</span>
              </h2>
              <ul className="card divide-y divide-hairline" aria-label={STATE_LABEL[state]}>
                {rows.map((r) => (
                  <li key={r.id} className="flex flex-wrap items-center gap-x-3 gap-y-1 px-3 py-2 text-sm" data-testid="floor-row">
                    <Link href={`/floor/plates/${r.id}`} className="font-bold hover:underline">
                      {plateName(r)} <span className="font-mono text-xs font-normal text-muted">{r.id.slice(0, 8)}</span>
                    </Link>
                    <span className="text-muted">{plural(r.pieceCount, "piece")}</span>
                    {r.source === "reprint" ? <span className="rounded-card bg-paper px-1.5 text-xs">reprint</span> : null}
                    <span className="text-xs text-muted">
                      {r.movedAt ? `moved ${when(r.movedAt)} by ${r.movedBy ?? r.movedByEmail ?? "—"}` : `made ${when(r.createdAt)}`}
                    </span>
                    <span className="ml-auto" />
                    {mayMove ? <MoveButtons id={r.id} from={state} moves={nextMoves(state)} /> : null}
                  </li>
                ))}
              </ul>
              {pagesInAll > 1 ? (
                <nav className="mt-1 flex flex-wrap items-center gap-3 text-sm" aria-label={`Pages of ${STATE_LABEL[state]}`}>
                  <span className="font-mono text-xs text-muted" data-testid={`floor-range-${state}`}>
                    {count(first)}–{count(lastShown)} of {count(n)}
                  </span>
                  {page > 1 ? (
                    <Link className="text-accent underline" href={`${href({ [pageParam(state)]: page - 1 })}#floor-${state}`}>
                      ← Previous {FLOOR_PAGE}
                    </Link>
                  ) : null}
                  {page < pagesInAll ? (
                    <Link className="text-accent underline" href={`${href({ [pageParam(state)]: page + 1 })}#floor-${state}`}>
                      Next {Math.min(FLOOR_PAGE, n - lastShown)} →
                    </Link>
                  ) : null}
                  <span className="text-xs text-muted">
                    page {page} of {pagesInAll}
                  </span>
                </nav>
              ) : null}
            </section>
          );
        })}
      </div>
    </FloorNotices>
  );
}
