import type { Metadata } from "next";
import { plateFormats } from "@/db/queries/plates";
import { EXPORT_FORMATS } from "@/lib/geometry/formats";
import Link from "next/link";
import { notFound } from "next/navigation";
import { requireCaller } from "@/lib/auth/guards";
import { can } from "@/lib/auth/permissions";
import type { PlateLayout } from "@/lib/geometry/build-plate";
import { slabTopSvg } from "@/lib/geometry/thumbnail";
import { nextMoves, piecesOf, plateFloor, STATE_LABEL } from "@/lib/floor/service";
import { when } from "@/lib/format";
import {
  FloorNoticeLine,
  FloorNotices,
  InspectionForm,
  MoveButtons,
  PlateBuildWatch,
  ReprintButton,
} from "../../_components/floor-controls";
import { plateName } from "@/lib/plates/name";
import { PAPER_IDS, PAPERS } from "@/lib/floor/sheet-layout";
import { plural } from "@/lib/plural";
import { NotFound } from "@/lib/errors";

export const metadata: Metadata = { title: "Plate on the floor" };

/** A plate whose files are not on the floor yet, in words. */
const JOB_LABEL: Record<"queued" | "running" | "done" | "failed", string> = {
  queued: "files waiting to be made",
  running: "files being made",
  done: "ready",
  failed: "files could not be made",
};

export default async function FloorPlatePage({ params }: { params: Promise<{ id: string }> }) {
  const { id } = await params;
  // A phone scanning the sheet's QR code comes back here after signing in.
  const caller = await requireCaller(`/floor/plates/${id}`);
  let f;
  try {
    f = await plateFloor(caller, id);
  } catch (err) {
    if (err instanceof NotFound) notFound();
    throw err;
  }
  const { plate, events, inspections, reprints, original } = f;
  const pieces = piecesOf(plate);
  const layout = (plate.stats as { layout?: PlateLayout } | null)?.layout;
  const state = plate.floorState;
  const last = inspections[0]?.i;
  const toReprint = last ? last.results.filter((r) => r.state !== "present") : [];
  const mayInspect = can(caller.role, "inspections:record");
  // The files for the slicer, for the roles that may download them.
  const formats = plate.jobState === "done" && can(caller.role, "plates:download") ? await plateFormats(caller, plate.id) : [];
  return (
    <FloorNotices>
      <div className="mx-auto max-w-2xl space-y-4">
        <PlateBuildWatch id={plate.id} state={plate.jobState} />
        <header className="space-y-1">
          <p className="text-sm">
            <Link href="/floor" className="text-accent underline">
              ← Floor
            </Link>
          </p>
          <h1 className="text-xl sm:text-2xl">
            {plateName(plate)} <span className="font-mono text-base text-muted">{plate.id.slice(0, 8)}</span>
          </h1>
          <p className="text-sm text-muted">
            {plural(plate.pieceCount, "piece")}
            {plate.reference ? (
              <>
                {" "}
                · order reference{" "}
                <span className="font-mono text-ink" data-testid="plate-reference">
                  {plate.reference}
                </span>
              </>
            ) : null}
          </p>
          <p className="text-sm" data-testid="floor-state">
            Status: <strong>{state ? STATE_LABEL[state] : JOB_LABEL[plate.jobState]}</strong>
            {original ? (
              <>
                {" "}
                · reprint of{" "}
                <Link className="text-accent underline" href={`/floor/plates/${original.id}`}>
                  {original.id.slice(0, 8)}
                </Link>{" "}
                ({original.floorState ? STATE_LABEL[original.floorState] : "—"})
              </>
            ) : null}
          </p>
          {plate.proof ? (
            <p className={`text-sm ${plate.proof.ok ? "text-muted" : "text-finding-error"}`} data-testid="plate-proof">
              {plate.proof.summary}
            </p>
          ) : null}
          {formats.length ? (
            <p className="space-x-3 text-sm" data-testid="plate-files">
              {formats.map((f) => (
                <a key={f} className="text-accent underline" href={`/api/plates/${plate.id}/download?format=${f}`}>
                  Download {EXPORT_FORMATS[f].label}
                </a>
              ))}
            </p>
          ) : null}
          {state && mayInspect ? <MoveButtons id={plate.id} from={state} moves={nextMoves(state)} /> : null}
        </header>
        <FloorNoticeLine />
        {layout ? (
          <section className="card space-y-2 p-3">
            <div
              className="flex justify-center [&>svg]:h-auto [&>svg]:max-h-72 [&>svg]:w-full"
              dangerouslySetInnerHTML={{
                __html: slabTopSvg(layout, pieces, 480, 320, new Set(state === "reprint_needed" ? toReprint.map((r) => r.number) : [])),
              }}
            />
            <p className="flex flex-wrap gap-3 text-sm">
              {PAPER_IDS.map((paper) => (
                <a key={paper} className="text-accent underline" href={`/api/plates/${plate.id}/map.pdf?paper=${paper}`}>
                  Plate map (PDF, {PAPERS[paper].label})
                </a>
              ))}
              <Link className="text-accent underline" href={`/floor/plates/${plate.id}/sheet`}>
                Printable page
              </Link>
            </p>
          </section>
        ) : (
          <p className="card p-3 text-sm text-muted" data-testid="plate-building">
            {plate.jobState === "failed"
              ? `The plate's files could not be made${plate.error ? `: ${plate.error.message}` : "."}`
              : "The plate's files are being made; its map and inspection appear here as soon as they are ready (no need to reload)."}
          </p>
        )}
        {state === "reprint_needed" && toReprint.length ? (
          <section className="card space-y-2 border-l-4 border-l-finding-error p-3">
            <h2 className="text-base">To reprint</h2>
            <ul className="text-sm">
              {toReprint.map((r) => (
                <li key={r.number}>
                  Piece {r.number} · {pieces.find((p) => p.number === r.number)?.partName}: <strong>{r.state}</strong>
                  {r.note ? ` — ${r.note}` : ""}
                </li>
              ))}
            </ul>
            {can(caller.role, "plates:reprint") ? <ReprintButton id={plate.id} count={toReprint.length} /> : null}
          </section>
        ) : null}
        {reprints.length ? (
          <section className="card p-3 text-sm">
            <h2 className="text-base">Reprints</h2>
            <ul>
              {reprints.map((r) => (
                <li key={r.id} data-testid="reprint-row">
                  <Link className="text-accent underline" href={`/floor/plates/${r.id}`}>
                    {r.id.slice(0, 8)}
                  </Link>{" "}
                  · {plural(r.pieceCount, "piece")} · {r.floorState ? STATE_LABEL[r.floorState] : JOB_LABEL[r.jobState]}
                </li>
              ))}
            </ul>
          </section>
        ) : null}
        {layout && state && state !== "done" && state !== "reprint_needed" ? (
          <section className="card space-y-2 p-3">
            <h2 className="text-base">Inspect the slab</h2>
            <InspectionForm
              id={plate.id}
              pieces={pieces.map((p) => ({ number: p.number, partName: p.partName, copy: p.copy }))}
              canInspect={mayInspect}
            />
          </section>
        ) : null}
        <section className="card p-3 text-sm">
          <h2 className="text-base">History</h2>
          <ul className="space-y-1">
            {inspections.map(({ i, by, byEmail }) => (
              <li key={i.id}>
                {when(i.at)} · inspected by {by ?? byEmail ?? "—"}:{" "}
                {i.missing || i.defective ? `${i.missing} missing, ${i.defective} defective` : "every piece present"}
                {i.first ? <span className="text-muted"> (first inspection)</span> : null}
              </li>
            ))}
            {events.map(({ e, by, byEmail }) => (
              <li key={e.id} className="text-muted">
                {when(e.at)} · {e.fromState ? STATE_LABEL[e.fromState] : "—"} → {STATE_LABEL[e.toState]} by {by ?? byEmail ?? "—"}
                {e.note ? ` (${e.note})` : ""}
              </li>
            ))}
            <li className="text-muted">{when(plate.createdAt)} · made</li>
          </ul>
        </section>
      </div>
    </FloorNotices>
  );
}
