import type { Piscina } from "piscina";
import { runOnPool } from "./pool-run";
import { setThumbnail, versionForThumbnail } from "@/db/queries/templates";
import type { TemplateVariableDef } from "@/lib/geometry/template";
import { thumbnailValues } from "@/lib/templates/values";
import { slabTopSvg } from "@/lib/geometry/thumbnail";
import type { BuildOutcome, BuildTask } from "./build-thread";

/**
 * A template version's top view: its options built with the sample values on stand-in pieces in a
 * pool thread, drawn as SVG, stored on the version with what the checks said.
 */
export async function runThumbnailJob(pool: Piscina, versionId: string): Promise<void> {
  const v = await versionForThumbnail(versionId);
  if (!v || v.thumbnailState === "done") return;
  const task: BuildTask = {
    parts: [],
    options: v.options,
    variables: thumbnailValues(v.variables as TemplateVariableDef[], v.createdAt.toISOString().slice(0, 10)),
    title: "template",
    sample: true,
  };
  const outcome = await runOnPool<BuildOutcome>(pool, task);
  if (!outcome.ok) {
    await setThumbnail(versionId, {
      thumbnailState: "failed",
      findings: [{ severity: "error", code: outcome.code, message: outcome.message }],
    });
    return;
  }
  const r = outcome.result;
  await setThumbnail(versionId, {
    thumbnailState: r.layout ? "done" : "failed",
    thumbnailSvg: r.layout ? slabTopSvg(r.layout, r.pieces) : null,
    findings: r.findings,
  });
}
