import Link from "next/link";
import { EXPORT_FORMAT_IDS, EXPORT_FORMATS } from "@/lib/geometry/formats";
import type { PlateRow } from "@/db/queries/library";
import { when } from "@/lib/format";
import { DataTable, EmptyState, WIDE_ONLY } from "../../_components/page-header";
import { RemakeButton } from "./remake-button";

/** A proof's summary wraps within its cell rather than widen the table past the column. */
const PROOF = "block min-w-[10rem] max-w-[14rem] whitespace-normal text-xs";
/** Names wrap (the table's cells do not by default), so a long kit or template name does not push the files out of sight. */
const WRAP = "min-w-[8rem] max-w-[14rem] whitespace-normal!";
const sourceLabel = { editor: "slab editor", api: "API", reprint: "reprint" } as const;
const stateLabel = { queued: "waiting for a worker", running: "building", done: "ready", failed: "failed" } as const;

/** Plates as a table: when, what, who, how it went, and the files. Used for the workspace and per kit. */
export function PlatesTable({
  rows,
  label,
  showKit = true,
  empty,
  canMake = false,
  canDownload = false,
}: {
  rows: PlateRow[];
  label: string;
  showKit?: boolean;
  empty: string;
  canMake?: boolean;
  /** The files' links only for a role that may download them (a viewer's would answer "forbidden"). */
  canDownload?: boolean;
}) {
  if (rows.length === 0) return <EmptyState message={empty} />;
  return (
    <DataTable
      label={label}
      wideOnly={["Template", "Pieces", "Mass", "From", "By"]}
      head={["Made", ...(showKit ? ["Kit"] : []), "Template", "Pieces", "Mass", "From", "By", "Status", "Files"]}
    >
      {rows.map((p) => {
        const est = p.estimates as { totalMass?: number; material?: string } | null;
        const findings = p.findings as { severity: string; message?: string }[];
        const warnings = findings.filter((f) => f.severity === "warning").length;
        // Why a plate failed, in words: its first error finding, else the build's own error.
        const reason = p.jobState === "failed" ? (findings.find((f) => f.severity === "error")?.message ?? p.error?.message ?? null) : null;
        return (
          <tr key={p.id} data-testid="plate-row">
            <td className="w-[6.5rem] whitespace-normal! px-3 py-2 text-muted">{when(p.createdAt)}</td>
            {showKit ? (
              <td className={`${WRAP} px-3 py-2 font-bold`}>
                {p.reference ? <span className="block font-mono text-xs font-normal text-muted">{p.reference}</span> : null}
                {p.kitId && p.kitName ? (
                  <Link href={`/kits/${p.kitId}/slab`} className="hover:underline">
                    {p.kitName}
                  </Link>
                ) : (
                  (p.title ?? "posted parts")
                )}
              </td>
            ) : null}
            <td className={`${WRAP} px-3 py-2 ${WIDE_ONLY}`}>
              {p.templateId ? (
                <Link href={`/templates/${p.templateId}`} className="hover:underline">
                  {p.templateName} <span className="font-mono text-xs text-muted">v{p.templateVersion}</span>
                </Link>
              ) : (
                <span className="text-muted">—</span>
              )}
            </td>
            <td className={`px-3 py-2 font-mono ${WIDE_ONLY}`}>{p.pieceCount}</td>
            <td className={`px-3 py-2 font-mono ${WIDE_ONLY}`}>
              {est?.totalMass !== undefined ? `${est.totalMass.toFixed(1)} g ${est.material ?? ""}` : "—"}
            </td>
            <td className={`px-3 py-2 ${WIDE_ONLY}`}>{sourceLabel[p.source]}</td>
            <td className={`px-3 py-2 text-muted ${WIDE_ONLY}`}>{p.makerName ?? p.makerEmail ?? (p.source === "api" ? "API key" : "—")}</td>
            <td className={`px-3 py-2 ${p.jobState === "failed" ? "text-finding-error" : ""}`}>
              {stateLabel[p.jobState]}
              {warnings ? <span className="ml-1 text-finding-warning">· ⚠ {warnings}</span> : null}
              {reason ? (
                <span data-testid="plate-failure" className={PROOF}>
                  {reason}
                </span>
              ) : null}
              {p.proofSummary ? (
                <span data-testid="plate-proof" className={`${PROOF} ${p.proofOk ? "text-muted" : "text-finding-error"}`}>
                  {p.proofSummary}
                </span>
              ) : null}
            </td>
            <td className="px-3 py-2">
              <div className="flex flex-wrap items-center gap-x-2 gap-y-1">
                {(canDownload ? EXPORT_FORMAT_IDS.filter((f) => p.files.includes(f)) : []).map((f) => (
                  <a key={f} className="text-accent underline" href={`/api/plates/${p.id}/download?format=${f}`}>
                    {EXPORT_FORMATS[f].label}
                  </a>
                ))}
                {p.files.length === 0 ? <span className="text-muted">—</span> : null}
                {p.files.length > 0 && !canDownload ? <span className="text-muted">no download for your role</span> : null}
              </div>
              {canMake && p.remakeable && p.jobState !== "queued" && p.jobState !== "running" ? (
                <div className="mt-1">
                  <RemakeButton plateId={p.id} />
                </div>
              ) : null}
            </td>
          </tr>
        );
      })}
    </DataTable>
  );
}
