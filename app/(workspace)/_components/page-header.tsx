import type { ReactNode } from "react";

export function PageHeader({ title, lead, actions }: { title: string; lead?: string; actions?: ReactNode }) {
  return (
    <div className="mb-6 flex flex-wrap items-end justify-between gap-3">
      <div>
        <h1 className="text-xl">{title}</h1>
        {lead ? <p className="mt-1 text-sm text-muted">{lead}</p> : null}
      </div>
      {actions}
    </div>
  );
}

/** One sentence saying what to do next, and at most one action. */
export function EmptyState({ message, action }: { message: string; action?: ReactNode }) {
  return (
    <div className="card flex flex-col items-center gap-3 px-6 py-12 text-center">
      <p className="text-sm text-muted">{message}</p>
      {action}
    </div>
  );
}

/** A column's cells left out on a phone (see DataTable's `wideOnly`). */
export const WIDE_ONLY = "hidden md:table-cell";

/**
 * A table in a card that scrolls sideways when it must. `wideOnly` names the columns left out below
 * the md breakpoint (their cells carry WIDE_ONLY), so a phone shows what matters without scrolling.
 */
export function DataTable({
  head,
  children,
  label,
  wideOnly = [],
}: {
  head: string[];
  children: ReactNode;
  label: string;
  wideOnly?: string[];
}) {
  return (
    <div className="card overflow-x-auto">
      <table className="w-full text-left text-sm [&_td]:whitespace-nowrap" aria-label={label}>
        <thead className="border-b border-hairline text-xs uppercase tracking-wide text-muted">
          <tr>
            {head.map((h) => (
              <th key={h} scope="col" className={`px-3 py-2 font-bold ${wideOnly.includes(h) ? WIDE_ONLY : ""}`}>
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody className="divide-y divide-hairline">{children}</tbody>
      </table>
    </div>
  );
}
