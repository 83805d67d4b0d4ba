import type { Metadata } from "next";
import { notFound } from "next/navigation";
import { listKits } from "@/db/queries/library";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import type { TemplateVariableDef } from "@/lib/geometry/template";
import { when } from "@/lib/format";
import { getTemplate } from "@/lib/templates/service";
import { DataTable, PageHeader } from "../../_components/page-header";
import { ArchiveButton, DuplicateButton, RestoreButton } from "../_components/template-actions";
import { TemplateThumb } from "../_components/thumb";
import { UseInEditor } from "../_components/use-in-editor";
import { NotFound } from "@/lib/errors";
import { CodeDetails } from "@/app/_components/code-details";

export const metadata: Metadata = { title: "Template" };

export default async function TemplatePage({ params }: { params: Promise<{ id: string }> }) {
  const caller = await requireCaller();
  let t;
  try {
    t = await getTemplate(caller, (await params).id);
  } catch (err) {
    if (err instanceof NotFound) notFound();
    throw err;
  }
  const { template, versions, current } = t;
  const starter = !template.workspaceId;
  const mayEdit = can(caller.role, "templates:write");
  const kits = await listKits(caller);
  const vars = current.variables as TemplateVariableDef[];
  const findings = current.findings as { severity: string; message: string; code: string }[];
  return (
    <>
      <PageHeader
        title={template.name}
        lead={template.description || (starter ? "A starter template shipped with Slabwright." : "A template of this workspace.")}
      />
      <div className="grid gap-4 lg:grid-cols-[minmax(0,1fr)_20rem]">
        <section className="card space-y-3 p-4">
          <TemplateThumb svg={current.thumbnailSvg} state={current.thumbnailState} name={template.name} large />
          <p className="text-xs text-muted">
            Version {current.version} with the sample values on four stand-in pieces.{" "}
            {starter
              ? "Starters cannot be changed: duplicate one to make it yours."
              : "Editing in the slab editor saves a new version; plates keep the version they were made with."}
          </p>
          {findings
            .filter((f) => f.severity !== "info")
            .map((f, i) => (
              <p key={i} className={f.severity === "error" ? "text-sm text-finding-error" : "text-sm text-finding-warning"}>
                {f.severity === "error" ? "✕" : "⚠"} {f.message} <CodeDetails code={f.code} />
              </p>
            ))}
        </section>
        <aside className="space-y-3">
          <section className="card p-4 text-sm">
            <h2 className="text-base">Variables</h2>
            {vars.length === 0 ? (
              <p className="text-muted">
                None besides {"{date}"} and {"{kit}"}.
              </p>
            ) : null}
            <dl className="mt-1 space-y-1">
              {vars.map((v) => (
                <div key={v.name}>
                  <dt className="font-mono">
                    {`{${v.name}}`}
                    {v.label ? <span className="ml-1 font-sans text-muted">{v.label}</span> : null}
                  </dt>
                  <dd className="text-xs text-muted">
                    default {v.default ? `“${v.default}”` : "none (a value is required)"} · sample “{v.sample}”
                  </dd>
                </div>
              ))}
            </dl>
          </section>
          <section className="card space-y-2 p-4 text-sm">
            <h2 className="text-base">Use it</h2>
            <UseInEditor templateId={template.id} kits={kits.map((k) => ({ id: k.id, name: k.name }))} />
            <p className="text-xs text-muted">
              From the API: <code className="break-all font-mono">template={template.id}</code>
            </p>
            {mayEdit ? (
              <div className="flex gap-2">
                <DuplicateButton id={template.id} name={template.name} />
                {!starter ? <ArchiveButton id={template.id} name={template.name} archived={Boolean(template.archivedAt)} /> : null}
              </div>
            ) : null}
          </section>
        </aside>
      </div>
      <section className="mt-6 space-y-2" aria-labelledby="history">
        <h2 id="history" className="text-lg">
          Version history
        </h2>
        <DataTable label="Version history" head={["Version", "Saved", "By", "What changed", ""]}>
          {versions.map((v) => (
            <tr key={v.id} data-testid="version-row" className="align-top">
              <td className="px-3 py-2 font-mono">
                v{v.version}
                {v.version === template.currentVersion ? <span className="ml-1 font-sans text-xs text-muted">(current)</span> : null}
              </td>
              <td className="px-3 py-2 text-muted">{when(v.createdAt)}</td>
              <td className="px-3 py-2 text-muted">{v.by}</td>
              <td className="!whitespace-normal px-3 py-2 text-xs">
                <ul className="list-disc pl-4">
                  {(v.changes as string[]).map((c, i) => (
                    <li key={i}>{c}</li>
                  ))}
                </ul>
                {v.note ? <p className="mt-1 text-muted">{v.note}</p> : null}
              </td>
              <td className="px-3 py-2">
                {mayEdit && !starter && v.version !== template.currentVersion ? (
                  <RestoreButton id={template.id} version={v.version} />
                ) : null}
              </td>
            </tr>
          ))}
        </DataTable>
      </section>
    </>
  );
}
