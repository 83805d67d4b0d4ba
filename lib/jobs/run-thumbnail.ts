import { eq } from "drizzle-orm";
import type { Piscina } from "piscina";
import { db } from "@/db";
import { templateVersions } from "@/db/schema";
import { sampleValues, type TemplateVariableDef } from "@/lib/geometry/template";
import { slabTopSvg } from "@/lib/geometry/thumbnail";
import type { BuildOutcome, BuildTask } from "./build-thread";

/**
 * A template version's top view: its options built with the sample values on stand-in pieces in a
 * pool thread, drawn as SVG, stored on the version with what the checks said.
 */
export async function runThumbnailJob(pool: Piscina, versionId: string): Promise<void> {
  const [v] = await db().select().from(templateVersions).where(eq(templateVersions.id, versionId));
  if (!v || v.thumbnailState === "done") return;
  const task: BuildTask = { parts: [], options: v.options, variables: sampleValues(v.variables as TemplateVariableDef[], "Sample kit", v.createdAt.toISOString().slice(0, 10)), title: "template", sample: true };
  const outcome = (await pool.run(task)) as BuildOutcome;
  if (!outcome.ok) {
    await db().update(templateVersions).set({ thumbnailState: "failed", findings: [{ severity: "error", code: outcome.code, message: outcome.message }] }).where(eq(templateVersions.id, versionId));
    return;
  }
  const r = outcome.result;
  await db()
    .update(templateVersions)
    .set({ thumbnailState: r.layout ? "done" : "failed", thumbnailSvg: r.layout ? slabTopSvg(r.layout, r.pieces) : null, findings: r.findings })
    .where(eq(templateVersions.id, versionId));
}
