import type { Metadata } from "next";
import { notFound } from "next/navigation";
import QRCode from "qrcode";
import { requireCaller } from "@/lib/auth/guards";
import Link from "next/link";
import { cautionsFor, type SheetPlate } from "@/lib/floor/sheet";
import { PAPER_IDS, PAPERS, placeLabels, tilePlan, TILE_OVERLAP, type Paper } from "@/lib/floor/sheet-layout";
import { plateName } from "@/lib/plates/name";
import { plural } from "@/lib/plural";
import { platePageUrl, sheetPlate } from "@/lib/floor/sheet-response";
import { plateFloor } from "@/lib/floor/service";
import { parseOptions } from "@/lib/geometry/options";
import { PrintButton } from "./print-button";
import { AppError } from "@/lib/errors";

/** The page margin the printable page asks the browser for (mm). */
const MARGIN = 12;
/** Room on a 1:1 tile page for its label line (mm). */
const TILE_HEAD = 12;

export const metadata: Metadata = { title: "Plate map" };

const path = (polys: [number, number][][], D: number) =>
  polys.map((c) => `M${c.map(([x, y]) => `${x.toFixed(2)} ${(D - y).toFixed(2)}`).join("L")}Z`).join("");

/** The plate map as a printable page: the top view in real millimetres (print at 100 %). */
/** Bold digits in the sheet's face are about 0.64 em wide. */
const labelWidth = (t: string, size: number) => t.length * size * 0.64;

/** The slab and its pieces in slab mm, drawn through a window (x0, y0, w, h) of it at 1:1. */
function TopView({ s, win, label }: { s: SheetPlate; win: { x0: number; y0: number; w: number; h: number }; label: string }) {
  const D = s.layout.slab.depth;
  const labels = placeLabels(s.pieces, labelWidth, { min: 2.5, max: 6 });
  return (
    <svg
      viewBox={`${win.x0} ${D - win.y0 - win.h} ${win.w} ${win.h}`}
      style={{ width: `${win.w}mm`, height: `${win.h}mm` }}
      className="block"
      role="img"
      aria-label={label}
      data-testid="sheet-slab"
      data-mm-width={win.w}
    >
      <path d={path(s.layout.slab.outline, D)} fill="#efe8dc" stroke="#c9bfae" strokeWidth={0.3} />
      {s.layout.markOutlines ? <path d={path(s.layout.markOutlines, D)} fill="#8a7f6c" /> : null}
      {s.pieces.map((p) => (
        <path key={p.number} d={path(p.outline, D)} fill="#4a4f57" fillOpacity={0.85} />
      ))}
      {labels.map((l) => (
        <g key={l.number}>
          {l.leader ? (
            <>
              <line x1={l.leader[0]} y1={D - l.leader[1]} x2={l.leader[2]} y2={D - l.leader[3]} stroke="#1f2328" strokeWidth={0.25} />
              <circle cx={l.leader[0]} cy={D - l.leader[1]} r={0.35} fill="#1f2328" />
            </>
          ) : null}
          <text
            x={l.x}
            y={D - l.y}
            fontSize={l.size}
            textAnchor="middle"
            dominantBaseline="central"
            fill={l.inside ? "#fff" : "#1f2328"}
            fontWeight="bold"
          >
            {l.number}
          </text>
        </g>
      ))}
    </svg>
  );
}

export default async function SheetPage({
  params,
  searchParams,
}: {
  params: Promise<{ id: string }>;
  searchParams: Promise<{ paper?: string }>;
}) {
  const caller = await requireCaller();
  const asked = (await searchParams).paper ?? "a4";
  const paper: Paper = (PAPER_IDS as string[]).includes(asked) ? (asked as Paper) : "a4";
  const P = PAPERS[paper];
  let s;
  try {
    s = await sheetPlate(caller, (await plateFloor(caller, (await params).id)).plate);
  } catch (err) {
    if (err instanceof AppError) notFound();
    throw err;
  }
  const o = parseOptions(s.options);
  const { width: W, depth: D } = s.layout.slab;
  const url = platePageUrl(s.id);
  const qr = await QRCode.toString(url, { type: "svg", margin: 4, errorCorrectionLevel: "M" });
  // The printable area; the overview shares the first page with the header and table.
  const area = { w: P.w - 2 * MARGIN, h: P.h - 2 * MARGIN };
  const fits = W <= area.w && D <= 150;
  const plan = fits ? null : tilePlan(s.layout.slab, { w: area.w, h: area.h - TILE_HEAD });
  const overview = Math.min(area.w / W, 150 / D);
  const name = plateName(s);
  return (
    <article className="mx-auto space-y-3 bg-white p-4 text-sm print:p-0 [&_*]:print:shadow-none" style={{ maxWidth: `${area.w + 4}mm` }}>
      <style>{`@page { size: ${P.w}mm ${P.h}mm; margin: ${MARGIN}mm; }`}</style>
      <header className="flex items-start gap-4">
        <div className="grow">
          <h1 className="text-2xl">Plate map</h1>
          <p className="font-bold">{name}</p>
          <p className="text-xs text-muted">
            made {s.createdAt.toISOString().slice(0, 10)} · plate {s.id.slice(0, 8)}
            {s.templateName ? ` · template ${s.templateName} v${s.templateVersion}` : ""}
          </p>
          <p className="mt-2 flex flex-wrap items-center gap-3 print:hidden">
            <PrintButton />
            <span className="text-xs text-muted">
              Paper:{" "}
              {PAPER_IDS.map((id, i) => (
                <span key={id}>
                  {i ? " · " : ""}
                  {id === paper ? (
                    <strong aria-current="true">{PAPERS[id].label}</strong>
                  ) : (
                    <Link className="text-accent underline" href={`?paper=${id}`}>
                      {PAPERS[id].label}
                    </Link>
                  )}
                </span>
              ))}
            </span>
          </p>
        </div>
        <div className="w-[26mm] shrink-0 text-center text-[8pt] text-muted" aria-label="QR code to the plate's inspection page">
          <div className="[&>svg]:h-auto [&>svg]:w-full" dangerouslySetInnerHTML={{ __html: qr }} />
          Scan to inspect
        </div>
      </header>
      {/* Life size may be wider than a phone: it scrolls there rather than shrinking. */}
      <div className="max-w-full overflow-x-auto print:overflow-visible">
        {fits ? (
          <TopView s={s} win={{ x0: 0, y0: 0, w: W, h: D }} label={`Top view at 1:1, ${W.toFixed(0)} × ${D.toFixed(0)} mm`} />
        ) : (
          <svg
            viewBox={`0 0 ${W} ${D}`}
            style={{ width: `${W * overview}mm`, height: `${D * overview}mm` }}
            className="block"
            role="img"
            aria-label={`Overview at 1:${(1 / overview).toFixed(2)}`}
          >
            <path d={path(s.layout.slab.outline, D)} fill="#efe8dc" stroke="#c9bfae" strokeWidth={0.3 / overview} />
            {s.pieces.map((p) => (
              <path key={p.number} d={path(p.outline, D)} fill="#4a4f57" fillOpacity={0.85} />
            ))}
          </svg>
        )}
      </div>
      <p className="text-xs text-muted" data-testid="sheet-scale">
        {fits
          ? "Scale 1:1 — print at 100 % (turn off “fit to page”)."
          : `Overview at 1:${(1 / overview).toFixed(2)}, smaller than life; the slab follows at 1:1 on ` +
            `${plural(plan!.tiles.length, "page")} of its own` +
            (plan!.tiles.length > 1 ? `, in tiles overlapping ${TILE_OVERLAP} mm.` : ".")}{" "}
        Slab {W.toFixed(1)} × {D.toFixed(1)} mm · {P.label}.
      </p>
      <table className="w-full text-left text-xs" aria-label="Pieces on the plate">
        <thead>
          <tr className="border-b border-hairline">
            <th className="py-1">No.</th>
            <th>Part</th>
            <th>Copy</th>
            <th>OK</th>
          </tr>
        </thead>
        <tbody>
          {s.pieces.map((p) => (
            <tr key={p.number} className="border-b border-hairline">
              <td className="py-0.5 font-bold">{p.number}</td>
              <td>{p.partName}</td>
              <td>{p.copy}</td>
              <td>☐</td>
            </tr>
          ))}
        </tbody>
      </table>
      <section className="text-xs">
        <h2 className="text-sm">Print</h2>
        <p>
          {o.material} · nozzle {o.nozzle} mm · layer height {o.layerHeight} mm
          {s.estimates ? ` · about ${s.estimates.totalMass.toFixed(1)} g, ${s.estimates.filamentLength.toFixed(2)} m of filament` : ""}
        </p>
        <p>
          Slab {o.slab.thickness} mm; pieces stand {o.slab.gap} mm above it. Keep that air gap in the slicer (its support or raft gap
          setting), or the pieces fuse to the slab.
        </p>
        <h2 className="mt-2 text-sm">Cautions</h2>
        <ul className="list-disc pl-4">
          {cautionsFor(o.material, s.findings).map((c) => (
            <li key={c}>{c}</li>
          ))}
        </ul>
      </section>
      {(plan?.tiles ?? []).map((t, i) => (
        <section key={i} className="break-before-page break-inside-avoid space-y-1 pt-4 print:pt-0" data-testid="sheet-tile">
          <p className="text-xs">
            <strong>
              Tile {i + 1} of {plan!.tiles.length}
              {plan!.tiles.length > 1 ? ` · column ${t.column + 1} of ${plan!.columns}, row ${t.row + 1} of ${plan!.rows}` : ""}
            </strong>{" "}
            · Scale 1:1, print at 100 % · {name} · plate {s.id.slice(0, 8)}
          </p>
          <div className="max-w-full overflow-x-auto outline-dashed outline-1 outline-hairline print:overflow-visible">
            <TopView s={s} win={t} label={`Top view at 1:1, tile ${i + 1}`} />
          </div>
        </section>
      ))}
    </article>
  );
}
