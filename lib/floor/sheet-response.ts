import "server-only";
import type { Plate } from "@/db/schema";
import { templateLabel } from "@/db/queries/templates";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { PlacedPiece, PlateLayout } from "@/lib/geometry/build-plate";
import type { Estimates } from "@/lib/geometry/estimates";
import { appUrl } from "@/lib/mail";
import { PAPERS, plateMapPdf, type Paper, type SheetPlate } from "./sheet";
import { PAPER_IDS } from "./sheet-layout";
import { plateName } from "@/lib/plates/name";
import { BadRequest, Conflict } from "@/lib/errors";

/** What the sheet needs of a plate, with its template's name and version. */
export async function sheetPlate(actor: WorkspaceActor, p: Plate): Promise<SheetPlate> {
  const stats = p.stats as { layout?: PlateLayout; pieces?: PlacedPiece[] } | null;
  if (p.jobState !== "done" || !stats?.layout || !stats.pieces)
    throw new Conflict(
      "not_ready",
      p.jobState === "failed"
        ? "The plate failed, so it has no map."
        : "The plate is still being made; its map exists once the build is done.",
    );
  // Within the plate's workspace: its template is that workspace's own or a starter.
  const t = p.templateVersionId ? await templateLabel(actor, p.templateVersionId) : null;
  return {
    id: p.id,
    title: p.title,
    reference: p.reference,
    createdAt: p.createdAt,
    options: p.options,
    variables: p.variables,
    findings: p.findings as SheetPlate["findings"],
    estimates: p.estimates as unknown as Estimates | null,
    layout: stats.layout,
    pieces: stats.pieces,
    templateName: t?.name ?? null,
    templateVersion: t?.version ?? null,
    proofSummary: p.proof?.summary ?? null,
  };
}

/** The plate's page in the app, where the sheet's QR code leads (the inspection page). */
export const platePageUrl = (id: string) => appUrl(`/floor/plates/${id}`);

export async function sheetResponse(req: Request, actor: WorkspaceActor, p: Plate): Promise<Response> {
  const paper = (new URL(req.url).searchParams.get("paper") ?? "a4").toLowerCase();
  if (!(paper in PAPERS)) throw new BadRequest("bad_request", `Paper must be one of ${PAPER_IDS.join(", ")}.`);
  const pdf = await plateMapPdf(await sheetPlate(actor, p), platePageUrl(p.id), paper as Paper);
  const stem =
    plateName(p)
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-|-$/g, "")
      .slice(0, 60) || "plate";
  return new Response(pdf as Uint8Array<ArrayBuffer>, {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Disposition": `inline; filename="${stem}-${p.id.slice(0, 4)}-map-${paper}.pdf"`,
      "Content-Length": String(pdf.byteLength),
      "X-Plate-Id": p.id,
    },
  });
}
