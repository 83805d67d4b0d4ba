import type { Metadata } from "next";
import { notFound } from "next/navigation";
import QRCode from "qrcode";
import { requireCaller } from "@/lib/auth/guards";
import { cautionsFor } from "@/lib/floor/sheet";
import { platePageUrl, sheetPlate } from "@/lib/floor/sheet-response";
import { plateFloor } from "@/lib/floor/service";
import { parseOptions } from "@/lib/geometry/options";
import { PrintButton } from "./print-button";
import { AppError } from "@/lib/errors";

const SCALE_NOTE = {
  fits: "Scale 1:1 — print at 100 % (turn off “fit to page”).",
  smaller: "The slab is larger than the paper: drawn smaller than life.",
};

export const metadata: Metadata = { title: "Plate map" };

const path = (polys: [number, number][][], D: number) =>
  polys.map((c) => `M${c.map(([x, y]) => `${x.toFixed(2)} ${(D - y).toFixed(2)}`).join("L")}Z`).join("");

/** The plate map as a printable page: the top view in real millimetres (print at 100 %). */
export default async function SheetPage({ params }: { params: Promise<{ id: string }> }) {
  const caller = await requireCaller();
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
  const fits = W <= 186 && D <= 180;
  return (
    <article className="mx-auto max-w-[190mm] space-y-3 bg-white p-4 text-sm print:p-0 [&_*]:print:shadow-none">
      <header className="flex items-start gap-4">
        <div className="grow">
          <h1 className="text-2xl">Plate map</h1>
          <p className="font-bold">{s.title}</p>
          <p className="text-xs text-muted">
            made {s.createdAt.toISOString().slice(0, 10)} · plate {s.id.slice(0, 8)}
            {s.templateName ? ` · template ${s.templateName} v${s.templateVersion}` : ""}
          </p>
          <p className="mt-2 print:hidden">
            <PrintButton />
          </p>
        </div>
        <div className="w-[26mm] shrink-0 text-center text-[8pt] text-muted" aria-label="QR code to the plate's inspection page">
          <div className="[&>svg]:h-auto [&>svg]:w-full" dangerouslySetInnerHTML={{ __html: qr }} />
          Scan to inspect
        </div>
      </header>
      <svg
        viewBox={`-1 -1 ${W + 2} ${D + 2}`}
        style={fits ? { width: `${W + 2}mm`, height: `${D + 2}mm` } : { width: "100%" }}
        className="mx-auto block"
        role="img"
        aria-label={`Top view, ${W.toFixed(0)} × ${D.toFixed(0)} mm`}
      >
        <path d={path(s.layout.slab.outline, D)} fill="#efe8dc" stroke="#c9bfae" strokeWidth={0.3} />
        {s.layout.markOutlines ? <path d={path(s.layout.markOutlines, D)} fill="#8a7f6c" /> : null}
        {s.pieces.map((p) => (
          <g key={p.number}>
            <path d={path(p.outline, D)} fill="#4a4f57" fillOpacity={0.85} />
            <text
              x={(p.bounds.minX + p.bounds.maxX) / 2}
              y={D - (p.bounds.minY + p.bounds.maxY) / 2}
              fontSize={Math.max(2.5, Math.min(6, (p.bounds.maxX - p.bounds.minX) / 2.5))}
              textAnchor="middle"
              dominantBaseline="central"
              fill="#fff"
              fontWeight="bold"
            >
              {p.number}
            </text>
          </g>
        ))}
      </svg>
      <p className="text-xs text-muted">
        {fits ? SCALE_NOTE.fits : SCALE_NOTE.smaller} Slab {W.toFixed(1)} × {D.toFixed(1)} mm.
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
    </article>
  );
}
