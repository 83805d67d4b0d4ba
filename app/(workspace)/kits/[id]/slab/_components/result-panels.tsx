"use client";

import type { Finding } from "@/lib/geometry/checks";
import { amount } from "@/lib/format";
import type { Preview } from "./preview";
import { CodeDetails } from "@/app/_components/code-details";

const icon = { error: "✕", warning: "⚠", info: "ℹ" } as const;
const tone = { error: "text-finding-error", warning: "text-finding-warning", info: "text-finding-info" } as const;

/** The newest build's findings; one that names a piece selects it. `findings` null: no build yet. */
export function FindingsPanel({ findings, onSelect }: { findings: Finding[] | null; onSelect: (piece: number) => void }) {
  return (
    <section className="card p-3">
      <h2 className="text-base">Findings</h2>
      {!findings ? (
        <p className="text-muted">—</p>
      ) : findings.length === 0 ? (
        <p className="text-muted">None: the slab passes every check.</p>
      ) : null}
      <ul className="mt-1 space-y-1.5" data-testid="findings">
        {findings?.map((f, i) => (
          <li key={i} className={tone[f.severity]}>
            <button type="button" className="text-left" onClick={() => f.piece !== undefined && onSelect(f.piece)}>
              <span aria-hidden="true">{icon[f.severity]} </span>
              <span className="font-bold">{f.severity}</span> <span className="text-ink">{f.message}</span>
            </button>
            <CodeDetails code={f.code} />
          </li>
        ))}
      </ul>
    </section>
  );
}

/** Slab size, pieces, mass, filament, cost and how much of the slab the pieces use. */
export function EstimatesPanel({ preview }: { preview: Preview | null }) {
  if (!preview?.estimates || !preview.layout) return null;
  const { estimates: e, layout } = preview;
  return (
    <section className="card p-3" data-testid="estimates">
      <h2 className="text-base">Estimates</h2>
      <dl className="mt-1 grid grid-cols-2 gap-x-2 gap-y-0.5 font-mono text-xs">
        <dt className="font-sans text-muted">Slab</dt>
        <dd>
          {layout.slab.width.toFixed(1)} × {layout.slab.depth.toFixed(1)} mm
        </dd>
        <dt className="font-sans text-muted">Pieces</dt>
        <dd>{preview.pieces.length}</dd>
        <dt className="font-sans text-muted">Mass</dt>
        <dd>
          {e.totalMass.toFixed(1)} g {e.material}
        </dd>
        <dt className="font-sans text-muted">Filament</dt>
        <dd>{e.filamentLength.toFixed(2)} m</dd>
        <dt className="font-sans text-muted">Cost</dt>
        {/* The engine's cost is in the price per kg's currency, euro (a workspace has no currency setting). */}
        <dd>{amount(Math.round(e.cost * 100))}</dd>
        <dt className="font-sans text-muted">Slab used</dt>
        <dd>{(layout.utilisation * 100).toFixed(0)} %</dd>
      </dl>
    </section>
  );
}
