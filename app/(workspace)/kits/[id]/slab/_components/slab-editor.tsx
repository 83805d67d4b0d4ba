"use client";

import dynamic from "next/dynamic";
import { useCallback, useEffect, useMemo, useState } from "react";
import type { PlacedPiece } from "@/lib/geometry/build-plate";
import { useForm, useWatch } from "react-hook-form";
import { useToast } from "@/app/_components/toasts";
import { MATERIALS, slabOptionsSchema } from "@/lib/geometry/options";
import type { SlabOptionsInput } from "@/lib/geometry/options";
import type { TemplateVariableDef } from "@/lib/geometry/template";
import { DEFAULT_VALUES, fieldNotes, formToOptions, optionsToForm, valuePlaceholders, type FormValues } from "./form-model";
import { FieldNotesContext } from "./fields";
import { OptionsFields, slabResolver } from "./options-form";
import { SaveTemplate } from "./save-template";
import { movedPlacements } from "./layout-history";
import { PlateMap } from "./plate-map";
import type { EditorPart } from "./protocol";
import { useLayoutHistory } from "./use-layout-history";
import { useMakePlate } from "./use-make-plate";
import { useSlabWorker } from "./use-slab-worker";

const View3D = dynamic(() => import("./view-3d").then((m) => m.View3D), { ssr: false, loading: () => <p className="p-4 text-sm text-muted">Loading the 3D view…</p> });

const icon = { error: "✕", warning: "⚠", info: "ℹ" } as const;
const tone = { error: "text-finding-error", warning: "text-finding-warning", info: "text-finding-info" } as const;

export type EditorTemplate = { id: string; name: string; version: number; starter: boolean; options: SlabOptionsInput; variables: TemplateVariableDef[] };

export function SlabEditor({ kitId, kitName, parts, canMake, canSaveTemplates, templates, initialTemplateId }: { kitId: string; kitName: string; parts: EditorPart[]; canMake: boolean; canSaveTemplates: boolean; templates: EditorTemplate[]; initialTemplateId?: string }) {
  const toast = useToast();
  const form = useForm<FormValues>({ defaultValues: DEFAULT_VALUES, resolver: slabResolver, mode: "onChange" });
  const values = useWatch({ control: form.control }) as FormValues;
  const layout = useLayoutHistory();
  const placements = layout.placements;
  const [selected, setSelected] = useState<number | undefined>();
  const [top, setTop] = useState(false);

  const options = useMemo(() => formToOptions(values, placements), [values, placements]);
  const check = useMemo(() => slabOptionsSchema.safeParse(options), [options]);
  const [applied, setApplied] = useState<EditorTemplate | null>(() => templates.find((t) => t.id === initialTemplateId) ?? null);
  const wanted = useMemo(() => (applied ? applied.variables.map((v) => v.name) : valuePlaceholders(values)), [applied, values]);
  const samplesKey = JSON.stringify(wanted.map((n) => values.samples?.[n] ?? ""));
  // The values sent with a build: the template's variables (or the placeholders in use) and {kit}.
  const variables = useMemo(() => ({ kit: kitName, ...Object.fromEntries(wanted.map((n) => [n, values.samples?.[n] ?? ""])) }), [wanted, samplesKey, kitName]);
  const applyTemplate = useCallback(
    (t: EditorTemplate | null) => {
      setApplied(t);
      if (!t) return;
      form.reset(optionsToForm(t.options, Object.fromEntries(t.variables.map((v) => [v.name, v.sample || v.default]))));
      layout.replace(undefined);
    },
    [form, layout.replace],
  );
  useEffect(() => {
    if (applied) applyTemplate(applied);
    // Apply the template named in the address once, on opening.
  }, []);

  const { ready, preview: result, problem, latency } = useSlabWorker(parts, options, variables, check.success);
  const { making, busy, make } = useMakePlate();

  const notes = useMemo(() => fieldNotes(result?.findings ?? [], form.getValues()), [result, form]);
  const flagged = useMemo(() => new Set((result?.findings ?? []).filter((f) => f.severity !== "info").flatMap((f) => [f.piece, ...(f.pieces ?? [])]).filter((n): n is number => n !== undefined)), [result]);
  const moveTo = useCallback(
    (piece: PlacedPiece, dx: number, dy: number, turn = 0) => {
      if (result) layout.place(movedPlacements(result.pieces, piece.number, dx, dy, turn));
    },
    [result, layout.place],
  );
  const sel = result?.pieces.find((p) => p.number === selected);

  return (
    <div className="grid gap-4 md:grid-cols-[16rem_minmax(0,1fr)] xl:grid-cols-[18rem_minmax(0,1fr)_18rem]">
      <div className="space-y-3">
        <section className="card space-y-2 p-3 text-sm" aria-label="Template">
          <label className="block text-xs text-muted">
            Template
            <select
              className="field-input mt-0.5 py-1 text-sm"
              aria-label="Apply a template"
              value={applied?.id ?? ""}
              onChange={(e) => {
                const t = templates.find((x) => x.id === e.target.value) ?? null;
                applyTemplate(t);
                if (t) toast("note", `“${t.name}” (version ${t.version}) applied: its options are in the form, its sample values below.`);
              }}
            >
              <option value="">none — options of my own</option>
              {templates.map((t) => (
                <option key={t.id} value={t.id}>
                  {t.name} · v{t.version}
                  {t.starter ? " · starter" : ""}
                </option>
              ))}
            </select>
          </label>
          {canSaveTemplates ? <SaveTemplate values={values} applied={applied} onSaved={(t) => setApplied(t)} /> : null}
        </section>
        <form className="card space-y-3 p-3 text-sm" aria-label="Slab options" onSubmit={(e) => e.preventDefault()}>
          <FieldNotesContext.Provider value={notes}>
            <OptionsFields form={form} />
          </FieldNotesContext.Provider>
        </form>
      </div>

      {/* The preview and the map stay in sight while the options column scrolls. */}
      <div className="space-y-3 md:sticky md:top-2 md:self-start">
        <div className="card relative h-[22rem] overflow-hidden bg-paper">
          {result?.slab && result.layout && ready ? (
            <View3D slab={result.slab} parts={ready.parts} pieces={result.viewPieces} size={result.layout.slab} top={top} selected={selected} flagged={flagged} onPick={setSelected} />
          ) : (
            <p className="p-4 text-sm text-muted">{problem ?? (ready ? "Building the preview…" : "Starting the engine in your browser…")}</p>
          )}
          {result?.stale ? (
            <p className="absolute left-2 top-2 rounded-card bg-surface/90 px-2 py-1 text-xs text-finding-error" data-testid="stale-preview">
              ✕ This change cannot be built (see the findings); the view shows the last slab that could.
            </p>
          ) : null}
          <button type="button" className="btn-quiet absolute right-2 top-2 px-2 py-1 text-xs" onClick={() => setTop(!top)}>
            {top ? "Angled view" : "Top view"}
          </button>
        </div>
        <div className="card h-[20rem] p-2">
          {result?.layout ? (
            <PlateMap layout={result.layout} pieces={result.pieces} selected={selected} flagged={flagged} onSelect={setSelected} onMove={(p, dx, dy, turn) => moveTo(p, dx, dy, turn)} />
          ) : (
            <p className="p-2 text-sm text-muted">The plate map appears with the first preview.</p>
          )}
        </div>
        <div className="flex flex-wrap items-center gap-2 text-xs">
          <button type="button" className="btn-quiet px-2 py-1" disabled={!placements} onClick={layout.automatic}>
            Automatic layout
          </button>
          <button type="button" className="btn-quiet px-2 py-1" disabled={!layout.canUndo} onClick={layout.undo} title="Ctrl+Z">
            Undo
          </button>
          <button type="button" className="btn-quiet px-2 py-1" disabled={!layout.canRedo} onClick={layout.redo} title="Ctrl+Y">
            Redo
          </button>
          {sel ? (
            <>
              <span>Piece {sel.number} · {sel.partName}</span>
              <button type="button" className="btn-quiet px-2 py-1" onClick={(e) => moveTo(sel, 0, 0, e.shiftKey ? 1 : 15)}>
                Turn 15° (Shift: 1°)
              </button>
            </>
          ) : (
            <span className="text-muted">Drag a piece on the plate map to place it by hand.</span>
          )}
          <span className="ml-auto text-muted" data-testid="preview-ms" data-build={result?.seq ?? 0}>
            {result ? `built in ${result.ms.toFixed(0)} ms` : ""}
            {latency !== null ? ` · frame ${latency.toFixed(0)} ms after the change` : ""}
          </span>
        </div>
      </div>

      <aside className="space-y-3 text-sm md:col-span-2 md:grid md:grid-cols-2 md:gap-3 md:space-y-0 xl:col-span-1 xl:block xl:space-y-3">
        <section className="card p-3">
          <h2 className="text-base">Findings</h2>
          {!result ? <p className="text-muted">—</p> : result.findings.length === 0 ? <p className="text-muted">None: the slab passes every check.</p> : null}
          <ul className="mt-1 space-y-1.5" data-testid="findings">
            {result?.findings.map((f, i) => (
              <li key={i} className={tone[f.severity]}>
                <button type="button" className="text-left" onClick={() => f.piece !== undefined && setSelected(f.piece)}>
                  <span aria-hidden="true">{icon[f.severity]} </span>
                  <span className="font-bold">{f.severity}</span> <span className="text-ink">{f.message}</span> <code className="font-mono text-xs text-muted">{f.code}</code>
                </button>
              </li>
            ))}
          </ul>
        </section>
        {result?.estimates && result.layout ? (
          <section className="card p-3" data-testid="estimates">
            <h2 className="text-base">Estimates</h2>
            <dl className="mt-1 grid grid-cols-2 gap-x-2 gap-y-0.5 font-mono text-xs">
              <dt className="font-sans text-muted">Slab</dt>
              <dd>{result.layout.slab.width.toFixed(1)} × {result.layout.slab.depth.toFixed(1)} mm</dd>
              <dt className="font-sans text-muted">Pieces</dt>
              <dd>{result.pieces.length}</dd>
              <dt className="font-sans text-muted">Mass</dt>
              <dd>{result.estimates.totalMass.toFixed(1)} g {result.estimates.material}</dd>
              <dt className="font-sans text-muted">Filament</dt>
              <dd>{result.estimates.filamentLength.toFixed(2)} m</dd>
              <dt className="font-sans text-muted">Cost</dt>
              <dd>{result.estimates.cost.toFixed(2)}</dd>
              <dt className="font-sans text-muted">Slab used</dt>
              <dd>{(result.layout.utilisation * 100).toFixed(0)} %</dd>
            </dl>
          </section>
        ) : null}
        {canMake ? (
          <section className="card space-y-2 p-3">
            <button type="button" className="btn-primary w-full" disabled={!check.success || !result || result.findings.some((f) => f.severity === "error") || busy} onClick={() => void make({ kitId, options, variables, ...(applied ? { templateId: applied.id, templateVersion: applied.version } : {}) }, result?.pieces.length)}>
              Make the plate
            </button>
            {making ? (
              <div data-testid="make-status">
                <progress className="h-1.5 w-full accent-[#6d4aff]" max={1} value={making.progress} aria-label="Build progress" />
                <p className="text-xs text-muted">
                  {making.status}
                  {making.message ? ` — ${making.message}` : ""}
                </p>
                {making.status === "done" && making.plateId ? (
                  <p className="space-x-3 text-xs">
                    <a className="text-accent underline" href={`/api/plates/${making.plateId}/download?format=3mf`}>
                      Download 3MF
                    </a>
                    <a className="text-accent underline" href={`/api/plates/${making.plateId}/download?format=stl`}>
                      Download STL
                    </a>
                  </p>
                ) : null}
              </div>
            ) : null}
            <ul className="list-disc space-y-0.5 pl-4 text-xs text-muted" data-testid="cautions">
              <li>Keep the air gap in your slicer (support gap settings), or the pieces fuse to the slab.</li>
              <li>The nozzle (≈190–260 °C) and bed (up to ≈110 °C) are hot: let the plate cool before lifting the slab.</li>
              {MATERIALS[values.material]?.styrene ? <li className="text-finding-warning">⚠ {values.material} gives off styrene and fine particles while printing: ventilate the room.</li> : null}
              {result?.findings.some((f) => f.code === "small_part") ? <li className="text-finding-warning">⚠ Small parts: not for children under 3; follow the rules where you sell.</li> : null}
            </ul>
          </section>
        ) : null}
        {ready ? <p className="text-xs text-muted">Engine ready in {ready.ms.toFixed(0)} ms · {ready.triangles.toLocaleString("en-US")} part triangles</p> : null}
      </aside>
    </div>
  );
}
