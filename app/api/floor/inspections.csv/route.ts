import { apiRoute } from "@/lib/api/respond";
import { authorize } from "@/lib/auth/guards";
import type { PlacedPiece } from "@/lib/geometry/build-plate";
import { inspectionRows } from "@/lib/floor/service";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

const cell = (v: unknown) => {
  const s = v === null || v === undefined ? "" : String(v);
  // RFC 4180 quoting; a leading = + - @ is neutralised so a spreadsheet does not run it as a formula.
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return /[",\n\r]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
};

/** GET /api/floor/inspections.csv — every inspection of the workspace, one row per piece checked. */
export const GET = apiRoute(async () => {
  const caller = await authorize("workspace:view", "exporting inspections");
  const rows = await inspectionRows(caller);
  const lines = [["inspected_at", "plate_id", "plate", "kit", "inspector", "first_inspection", "piece", "part", "state", "note"].join(",")];
  for (const r of rows) {
    const pieces = (r.stats as { pieces?: PlacedPiece[] } | null)?.pieces ?? [];
    for (const c of r.i.results) {
      lines.push(
        [
          r.i.at.toISOString(),
          r.i.plateId,
          r.title,
          r.kitName,
          r.by ?? r.byEmail,
          r.i.first ? "yes" : "no",
          c.number,
          pieces.find((p) => p.number === c.number)?.partName,
          c.state,
          c.note,
        ]
          .map(cell)
          .join(","),
      );
    }
  }
  return new Response(`${lines.join("\r\n")}\r\n`, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="inspections-${new Date().toISOString().slice(0, 10)}.csv"`,
    },
  });
});
