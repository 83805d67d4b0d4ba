import type { Metadata } from "next";
import Link from "next/link";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import type { TemplateVariableDef } from "@/lib/geometry/template";
import { when } from "@/lib/format";
import { listTemplates } from "@/lib/templates/service";
import { EmptyState, PageHeader } from "../_components/page-header";
import { ArchiveButton, DuplicateButton } from "./_components/template-actions";
import { TemplateThumb } from "./_components/thumb";

export const metadata: Metadata = { title: "Templates" };

export default async function TemplatesPage({ searchParams }: { searchParams: Promise<{ q?: string; archived?: string }> }) {
  const caller = await requireCaller();
  const { q = "", archived } = await searchParams;
  const showArchived = archived === "1";
  const rows = await listTemplates(caller, { q, archived: showArchived });
  const mayEdit = can(caller.role, "templates:write");
  return (
    <>
      <PageHeader
        title="Templates"
        lead={
          "Reusable slab recipes: options, a logo and {placeholders} such as {order} and {customer}, filled for each plate. Apply " +
          "one in the slab editor, or name it in the API."
        }
      />
      <form className="mb-4 flex flex-wrap items-end gap-2" role="search" action="/templates">
        <label className="text-sm">
          <span className="block text-xs text-muted">Search templates</span>
          <input name="q" defaultValue={q} className="field-input mt-0.5 w-64 py-1" placeholder="name or description" />
        </label>
        {showArchived ? <input type="hidden" name="archived" value="1" /> : null}
        <button className="btn-quiet px-3 py-1.5 text-sm" type="submit">
          Search
        </button>
        <Link className="ml-auto text-sm text-accent underline" href={showArchived ? "/templates" : "/templates?archived=1"}>
          {showArchived ? "Back to the gallery" : "Archived templates"}
        </Link>
      </form>
      {rows.length === 0 ? (
        <EmptyState
          message={
            q
              ? `No template matches “${q}”.`
              : showArchived
                ? "Nothing archived."
                : "No templates yet: in the slab editor, choose “Save as a template” to reuse a slab on every order."
          }
        />
      ) : (
        <ul className="grid gap-4 sm:grid-cols-2 lg:grid-cols-3" aria-label="Template gallery">
          {rows.map((t) => {
            const vars = t.variables as TemplateVariableDef[];
            const problems = (t.findings as { severity: string }[]).filter((f) => f.severity !== "info").length;
            return (
              <li key={t.id} className="card flex flex-col gap-2 p-3" data-testid="template-tile">
                <TemplateThumb svg={t.thumbnailSvg} state={t.thumbnailState} name={t.name} />
                <div className="flex items-baseline gap-2">
                  <Link href={`/templates/${t.id}`} className="font-bold hover:underline">
                    {t.name}
                  </Link>
                  <span className="font-mono text-xs text-muted">v{t.version}</span>
                  {t.starter ? <span className="rounded-card bg-paper px-1.5 text-xs text-muted">starter</span> : null}
                </div>
                {t.description ? <p className="text-xs text-muted">{t.description}</p> : null}
                <p className="text-xs">
                  {vars.length ? (
                    vars.map((v) => <code key={v.name} className="mr-1 rounded bg-paper px-1 font-mono">{`{${v.name}}`}</code>)
                  ) : (
                    <span className="text-muted">no variables</span>
                  )}
                </p>
                {problems ? (
                  <p className="text-xs text-finding-warning">
                    ⚠ {problems} finding{problems > 1 ? "s" : ""} with the sample values
                  </p>
                ) : null}
                <p className="mt-auto pt-1 text-xs text-muted">
                  {t.starter ? "shipped with Slabwright" : `${when(t.updatedAt)}${t.updatedBy ? ` · ${t.updatedBy}` : ""}`}
                </p>
                <div className="flex flex-wrap items-center gap-2">
                  <Link href={`/templates/${t.id}`} className="btn-quiet px-2 py-1 text-xs" aria-label={`Open ${t.name}`}>
                    Open
                  </Link>
                  {mayEdit ? <DuplicateButton id={t.id} name={t.name} /> : null}
                  {mayEdit && !t.starter ? <ArchiveButton id={t.id} name={t.name} archived={Boolean(t.archivedAt)} /> : null}
                </div>
              </li>
            );
          })}
        </ul>
      )}
    </>
  );
}
