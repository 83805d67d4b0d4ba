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

export function DataTable({ head, children, label }: { head: string[]; children: ReactNode; label: string }) {
  return (
    <div className="card overflow-x-auto">
      <table className="w-full text-left text-sm [&_td]:whitespace-nowrap" aria-label={label}>
        <thead className="border-b border-hairline text-xs uppercase tracking-wide text-muted">
          <tr>
            {head.map((h) => (
              <th key={h} scope="col" className="px-3 py-2 font-bold">
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
