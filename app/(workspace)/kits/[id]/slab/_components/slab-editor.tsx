"use client";

import dynamic from "next/dynamic";
import { useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState } from "react";
import { useForm, useWatch } from "react-hook-form";
import type { PlacedPiece } from "@/lib/geometry/build-plate";
import { slabOptionsSchema } from "@/lib/geometry/options";
import { resolveTemplateValues } from "@/lib/templates/values";
import type { KitSlabSettings } from "@/lib/validation/kits";
import { editorStart, sameValues, settingsOf, templateForm, templateSamples, type EditorState } from "./editor-state";
import { FieldNotesContext } from "./fields";
import { fieldNotes, formToOptions, valuePlaceholders, type FormValues } from "./form-model";
import { movedPlacements } from "./layout-history";
import { MakePanel } from "./make-panel";
import { OptionsFields, slabResolver } from "./options-form";
import { PlateMap } from "./plate-map";
import type { EditorPart } from "./protocol";
import { EstimatesPanel, FindingsPanel } from "./result-panels";
import { TemplatePicker, type EditorTemplate } from "./template-picker";
import { TriedMap } from "./tried-map";
import { useEditHistory } from "./use-edit-history";
import { useKeptSettings } from "./use-kept-settings";
import { useMakePlate } from "./use-make-plate";
import { useSlabWorker } from "./use-slab-worker";

const View3D = dynamic(() => import("./view-3d").then((m) => m.View3D), {
  ssr: false,
  loading: () => <p className="p-4 text-sm text-muted">Loading the 3D view…</p>,
});

/** How long typing in the form waits before it becomes one step of undo. */
const STEP_PAUSE_MS = 500;

const keptWords = { kept: "Kept with the kit", keeping: "Keeping…", failed: "Not kept" } as const;

/**
 * The slab editor: the options form and templates on the left, the live preview (3D view and plate
 * map, hand placements) in the middle, findings, estimates and "Make the plate" on the right. The
 * engine runs in a Web Worker (useSlabWorker); the plate is made on the server (useMakePlate). The
 * kit keeps the newest settings (useKeptSettings); undo and redo step through options and moves.
 * `canEdit` false (a viewer): the same view, read-only, with nothing that saves or makes.
 */
export function SlabEditor({
  kitId,
  kitName,
  parts,
  canEdit,
  canMake,
  canSaveTemplates,
  templates,
  saved,
  initialTemplateId,
}: {
  kitId: string;
  kitName: string;
  parts: EditorPart[];
  canEdit: boolean;
  canMake: boolean;
  canSaveTemplates: boolean;
  templates: EditorTemplate[];
  saved: KitSlabSettings | null;
  initialTemplateId?: string;
}) {
  const [start] = useState(() => editorStart(templates, saved, initialTemplateId));
  const form = useForm<FormValues>({ defaultValues: start.values, resolver: slabResolver, mode: "onChange" });
  const values = useWatch({ control: form.control }) as FormValues;

  // Typing becomes a step after a pause; Undo first makes a step of what is still waiting.
  const flushRef = useRef<() => EditorState>(() => start);
  const beforeUndo = useCallback(() => void flushRef.current(), []);
  const history = useEditHistory<EditorState>(() => start, beforeUndo);
  const present = history.present;
  const { step } = history;
  // The newest state, for handlers that make a step from it (set again by each step made here).
  const presentRef = useRef(present);
  useLayoutEffect(() => {
    presentRef.current = present;
  }, [present]);
  /** Make the form's values a step when they differ from the present state; the (new) present state. */
  const flush = useCallback((): EditorState => {
    const v = form.getValues();
    if (sameValues(v, presentRef.current.values)) return presentRef.current;
    const next = { ...presentRef.current, values: structuredClone(v) };
    step(next);
    presentRef.current = next;
    return next;
  }, [form, step]);
  useLayoutEffect(() => {
    flushRef.current = flush;
  }, [flush]);
  const stepFrom = useCallback(
    (change: (s: EditorState) => EditorState) => {
      const next = change(flush());
      step(next);
      presentRef.current = next;
      // A template applied or saved changes the form's values too.
      if (!sameValues(form.getValues(), next.values)) form.reset(next.values);
    },
    [flush, step, form],
  );
  useEffect(() => {
    const t = setTimeout(flush, STEP_PAUSE_MS);
    return () => clearTimeout(t);
  }, [values, flush]);
  // Undo and redo put their state's values back in the form (only they: a step the form made itself
  // must not overwrite a key typed since).
  const { restores } = history;
  const restored = useRef(0);
  useEffect(() => {
    if (restored.current === restores) return;
    restored.current = restores;
    if (!sameValues(form.getValues(), present.values)) form.reset(present.values);
  }, [restores, present, form]);

  const placements = present.placements;
  const applied = present.applied;
  const [selected, setSelected] = useState<number | undefined>();
  const [top, setTop] = useState(false);

  const options = useMemo(() => formToOptions(values, placements), [values, placements]);
  const check = useMemo(() => slabOptionsSchema.safeParse(options), [options]);
  // The values a build uses: what is typed, else (for a template) the sample, else the default. The
  // same go to the server, so the plate holds what the preview shows.
  const defs = useMemo(
    () => applied?.variables ?? valuePlaceholders(values).map((name) => ({ name, default: "", sample: "" })),
    [applied, values],
  );
  const samplesKey = JSON.stringify(defs.map((d) => values.samples?.[d.name] ?? ""));
  const resolved = useMemo(() => {
    const typed = JSON.parse(samplesKey) as string[];
    return resolveTemplateValues(defs, Object.fromEntries(defs.map((d, i) => [d.name, typed[i] ?? ""])), {
      for: "preview",
      date: new Date().toISOString().slice(0, 10),
      kit: kitName,
    });
  }, [defs, samplesKey, kitName]);
  const variablesKey = JSON.stringify(Object.fromEntries(Object.entries(resolved.values).filter(([k]) => k !== "date")));
  const variables = useMemo(() => JSON.parse(variablesKey) as Record<string, string>, [variablesKey]);

  const keeping = useKeptSettings(
    kitId,
    useMemo(() => settingsOf(present), [present]),
    canEdit,
  );

  const applyTemplate = useCallback(
    (t: EditorTemplate | null) =>
      stepFrom((s) => (t ? { values: templateForm(t), placements: undefined, applied: t } : { ...s, applied: null })),
    [stepFrom],
  );
  // A template just saved: applied, and the Values fields take the sample values typed in the save
  // form (the newest word on them); a variable saved without a sample keeps its field, else its default.
  const onSaved = useCallback(
    (t: EditorTemplate) =>
      stepFrom((s) => {
        const samples = { ...s.values.samples };
        for (const v of t.variables) samples[v.name] = v.sample.trim() ? v.sample : samples[v.name]?.trim() ? samples[v.name]! : v.default;
        return { ...s, values: { ...s.values, samples }, applied: t };
      }),
    [stepFrom],
  );

  const { ready, preview: result, problem, latency } = useSlabWorker(parts, options, variables, check.success);
  const { making, busy, make } = useMakePlate();

  const notes = useMemo(() => fieldNotes(result?.findings ?? [], form.getValues()), [result, form]);
  // Findings name pieces by number; the view selects by slot, which stays with the piece.
  const slotOf = useCallback((n: number) => result?.pieces.find((p) => p.number === n)?.slot, [result]);
  const flagged = useMemo(
    () =>
      new Set(
        (result?.findings ?? [])
          .filter((f) => f.severity !== "info")
          .flatMap((f) => [f.piece, ...(f.pieces ?? [])])
          .map((n) => (n === undefined ? undefined : slotOf(n)))
          .filter((s): s is number => s !== undefined),
      ),
    [result, slotOf],
  );
  const moveTo = useCallback(
    (piece: PlacedPiece, dx: number, dy: number, turn = 0) => {
      if (!result || !canEdit) return;
      stepFrom((s) => ({ ...s, placements: movedPlacements(result.pieces, piece.slot, dx, dy, turn) }));
    },
    [result, stepFrom, canEdit],
  );
  const sel = result?.pieces.find((p) => p.slot === selected);
  const shown = result?.viewPieces.find((p) => p.slot === selected);
  const doesNotFit = result?.findings.find((f) => f.code === "does_not_fit");
  // What stops this change from building: said on the map when it still shows the last plate that built.
  const refusal = result?.findings.find((f) => f.severity === "error");

  return (
    <div className="grid gap-4 md:grid-cols-[19rem_minmax(0,1fr)] xl:grid-cols-[19rem_minmax(0,1fr)_19rem]" data-wide>
      <div className="min-w-0 space-y-3">
        {!canEdit ? (
          <p className="card border-finding-info/40 p-3 text-sm" data-testid="read-only">
            <span aria-hidden="true">ℹ </span>
            You can look at this kit&apos;s slab; your role does not change kits, so nothing here is saved.
          </p>
        ) : null}
        <TemplatePicker
          templates={templates}
          applied={applied}
          onApply={applyTemplate}
          values={values}
          canSave={canSaveTemplates && canEdit}
          onSaved={onSaved}
          disabled={!canEdit}
        />
        <form className="card p-3 text-sm" aria-label="Slab options" onSubmit={(e) => e.preventDefault()}>
          <fieldset disabled={!canEdit} className="min-w-0 space-y-3">
            <FieldNotesContext.Provider value={notes}>
              <OptionsFields form={form} missing={resolved.missing} fallbacks={applied ? templateSamples(applied) : {}} />
            </FieldNotesContext.Provider>
          </fieldset>
        </form>
      </div>

      {/* The preview and the map stay in sight while the options column scrolls; on a phone they come first. */}
      <div className="order-first min-w-0 space-y-3 md:sticky md:top-2 md:order-none md:self-start">
        <div
          className="card overflow-hidden bg-paper"
          data-highlight={shown ? `${shown.slot}:${shown.partName}` : ""}
          data-testid="view-card"
        >
          <div className="flex items-start gap-2 border-b border-hairline bg-surface px-2 py-1.5">
            <p className="min-w-0 flex-1 text-xs" role="status">
              {result?.stale ? (
                <span className="text-finding-error" data-testid="stale-preview">
                  <span aria-hidden="true">✕ </span>This change cannot be built (see the findings); the view shows the last slab that could.
                </span>
              ) : (
                <span className="text-muted">Drag to turn the view, scroll to zoom.</span>
              )}
            </p>
            <button type="button" className="btn-quiet shrink-0 px-2 py-1 text-xs" aria-pressed={top} onClick={() => setTop(!top)}>
              {top ? "Angled view" : "Top view"}
            </button>
          </div>
          <div className="relative h-[22rem]">
            {result?.slab && result.layout && ready ? (
              <View3D
                slab={result.slab}
                parts={ready.parts}
                pieces={result.viewPieces}
                size={result.layout.slab}
                top={top}
                selected={selected}
                flagged={flagged}
                onPick={setSelected}
              />
            ) : (
              <p className="p-4 text-sm text-muted" data-testid="view-message">
                {problem ??
                  (!ready
                    ? "Starting the engine in your browser…"
                    : doesNotFit
                      ? "No slab to show: the pieces do not fit the bed. The plate map below shows what was tried."
                      : result && !result.slab
                        ? "No slab to show yet: see the findings."
                        : "Building the preview…")}
              </p>
            )}
          </div>
        </div>
        <div className="card p-2" data-testid="map-card" data-state={result?.mapStale && !result.tried ? "not-updated" : "current"}>
          {result?.mapStale && !result.tried ? (
            <div className="mb-2 rounded-card border border-finding-error/40 bg-finding-error/10 p-2 text-xs" data-testid="map-not-updated">
              <p className="font-bold text-finding-error">
                <span aria-hidden="true">✕ </span>Not updated
              </p>
              <p className="mt-0.5">
                The map shows the last plate that could be built. This change cannot be: {refusal?.message ?? "see the findings."}
              </p>
            </div>
          ) : null}
          {/* Greyed while not updated; pieces can be picked, not moved (a move would not show until it builds). */}
          <div className={`h-[19rem] ${result?.mapStale && !result.tried ? "grayscale" : ""}`}>
            {result?.tried ? (
              <TriedMap tried={result.tried} message={doesNotFit?.message} />
            ) : result?.layout ? (
              <PlateMap
                layout={result.layout}
                pieces={result.pieces}
                selected={selected}
                flagged={flagged}
                onSelect={setSelected}
                onMove={(p, dx, dy, turn) => moveTo(p, dx, dy, turn)}
                readOnly={!canEdit || result.mapStale}
                notUpdated={result.mapStale}
              />
            ) : (
              <p className="p-2 text-sm text-muted">The plate map appears with the first preview.</p>
            )}
          </div>
        </div>
        <div className="flex flex-wrap items-center gap-2 text-xs">
          {canEdit ? (
            <>
              <button
                type="button"
                className="btn-quiet px-2 py-1"
                disabled={!placements}
                onClick={() => stepFrom((s) => ({ ...s, placements: undefined }))}
              >
                Automatic layout
              </button>
              <button
                type="button"
                className="btn-quiet px-2 py-1"
                disabled={!history.canUndo && sameValues(values, present.values)}
                onClick={history.undo}
                title="Ctrl+Z"
              >
                Undo
              </button>
              <button type="button" className="btn-quiet px-2 py-1" disabled={!history.canRedo} onClick={history.redo} title="Ctrl+Y">
                Redo
              </button>
            </>
          ) : null}
          {sel ? (
            <>
              <span data-testid="selection">
                Piece {sel.number} · {sel.partName}
              </span>
              {canEdit ? (
                <button type="button" className="btn-quiet px-2 py-1" onClick={(e) => moveTo(sel, 0, 0, e.shiftKey ? 1 : 15)}>
                  Turn 15° (Shift: 1°)
                </button>
              ) : null}
            </>
          ) : (
            <span className="text-muted">
              {canEdit ? "Drag a piece on the plate map to place it by hand." : "Pick a piece to see its name."}
            </span>
          )}
          {canEdit ? (
            <span
              className={`ml-auto ${keeping.state === "failed" ? "text-finding-error" : "text-muted"}`}
              data-testid="kept"
              data-state={keeping.state}
              data-saves={keeping.saves}
              title={keeping.message}
            >
              {keeping.state === "failed" ? "✕ " : ""}
              {keptWords[keeping.state]}
              {keeping.message ? `: ${keeping.message}` : ""}
            </span>
          ) : null}
        </div>
      </div>

      <aside
        className={
          "min-w-0 space-y-3 text-sm md:col-span-2 md:grid md:grid-cols-2 md:gap-3 md:space-y-0 xl:col-span-1 xl:block xl:space-y-3"
        }
      >
        <FindingsPanel findings={result?.findings ?? null} onSelect={(n) => setSelected(slotOf(n))} />
        <EstimatesPanel preview={result} />
        {canMake && canEdit ? (
          <MakePanel
            making={making}
            disabled={
              !check.success || !result || result.findings.some((f) => f.severity === "error") || busy || resolved.missing.length > 0
            }
            missing={resolved.missing}
            refusal={refusal?.message}
            onMake={() =>
              void make(
                { kitId, options, variables, ...(applied ? { templateId: applied.id, templateVersion: applied.version } : {}) },
                result?.pieces.length,
              )
            }
            material={values.material}
            smallParts={Boolean(result?.findings.some((f) => f.code === "small_part"))}
          />
        ) : null}
        <details className="text-xs text-muted" data-testid="engine-details">
          <summary className="cursor-pointer">Engine timings</summary>
          <p className="mt-1" data-testid="preview-ms" data-build={result?.seq ?? 0}>
            {result ? `Built in ${result.ms.toFixed(0)} ms` : "Not built yet"}
            {latency !== null ? ` · frame ${latency.toFixed(0)} ms after the change` : ""}
          </p>
          {ready ? (
            <p>
              Engine ready in {ready.ms.toFixed(0)} ms · {ready.triangles.toLocaleString("en-GB")} part triangles
            </p>
          ) : null}
        </details>
      </aside>
    </div>
  );
}
