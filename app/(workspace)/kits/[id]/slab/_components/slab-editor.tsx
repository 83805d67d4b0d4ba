"use client";

import dynamic from "next/dynamic";
import { useCallback, useMemo, useState } from "react";
import { useForm, useWatch } from "react-hook-form";
import type { PlacedPiece } from "@/lib/geometry/build-plate";
import { slabOptionsSchema } from "@/lib/geometry/options";
import { FieldNotesContext } from "./fields";
import { DEFAULT_VALUES, fieldNotes, formToOptions, optionsToForm, valuePlaceholders, type FormValues } from "./form-model";
import { movedPlacements } from "./layout-history";
import { MakePanel } from "./make-panel";
import { OptionsFields, slabResolver } from "./options-form";
import { PlateMap } from "./plate-map";
import type { EditorPart } from "./protocol";
import { EstimatesPanel, FindingsPanel } from "./result-panels";
import { TemplatePicker, type EditorTemplate } from "./template-picker";
import { useLayoutHistory } from "./use-layout-history";
import { useMakePlate } from "./use-make-plate";
import { useSlabWorker } from "./use-slab-worker";

/** The form's values for a template: its options, and its variables' sample values (else their defaults). */
const templateForm = (t: EditorTemplate) =>
  optionsToForm(t.options, Object.fromEntries(t.variables.map((v) => [v.name, v.sample || v.default])));

const View3D = dynamic(() => import("./view-3d").then((m) => m.View3D), {
  ssr: false,
  loading: () => <p className="p-4 text-sm text-muted">Loading the 3D view…</p>,
});

/**
 * The slab editor: the options form and templates on the left, the live preview (3D view and plate
 * map, hand placements) in the middle, findings, estimates and "Make the plate" on the right. The
 * engine runs in a Web Worker (useSlabWorker); the plate is made on the server (useMakePlate).
 */
export function SlabEditor({
  kitId,
  kitName,
  parts,
  canMake,
  canSaveTemplates,
  templates,
  initialTemplateId,
}: {
  kitId: string;
  kitName: string;
  parts: EditorPart[];
  canMake: boolean;
  canSaveTemplates: boolean;
  templates: EditorTemplate[];
  initialTemplateId?: string;
}) {
  // A template named in the address opens the editor with its options and sample values.
  const [applied, setApplied] = useState<EditorTemplate | null>(() => templates.find((t) => t.id === initialTemplateId) ?? null);
  const form = useForm<FormValues>({
    defaultValues: applied ? templateForm(applied) : DEFAULT_VALUES,
    resolver: slabResolver,
    mode: "onChange",
  });
  const values = useWatch({ control: form.control }) as FormValues;
  const layout = useLayoutHistory();
  const placements = layout.placements;
  const [selected, setSelected] = useState<number | undefined>();
  const [top, setTop] = useState(false);

  const options = useMemo(() => formToOptions(values, placements), [values, placements]);
  const check = useMemo(() => slabOptionsSchema.safeParse(options), [options]);
  const wanted = useMemo(() => (applied ? applied.variables.map((v) => v.name) : valuePlaceholders(values)), [applied, values]);
  const samplesKey = JSON.stringify(wanted.map((n) => values.samples?.[n] ?? ""));
  // The values sent with a build: the template's variables (or the placeholders in use) and {kit}.
  const variables = useMemo(() => {
    const samples = JSON.parse(samplesKey) as string[];
    return { kit: kitName, ...Object.fromEntries(wanted.map((n, i) => [n, samples[i] ?? ""])) };
  }, [wanted, samplesKey, kitName]);
  const { replace: replaceLayout, place } = layout;
  const applyTemplate = useCallback(
    (t: EditorTemplate | null) => {
      setApplied(t);
      if (!t) return;
      form.reset(templateForm(t));
      replaceLayout(undefined);
    },
    [form, replaceLayout],
  );

  const { ready, preview: result, problem, latency } = useSlabWorker(parts, options, variables, check.success);
  const { making, busy, make } = useMakePlate();

  const notes = useMemo(() => fieldNotes(result?.findings ?? [], form.getValues()), [result, form]);
  const flagged = useMemo(
    () =>
      new Set(
        (result?.findings ?? [])
          .filter((f) => f.severity !== "info")
          .flatMap((f) => [f.piece, ...(f.pieces ?? [])])
          .filter((n): n is number => n !== undefined),
      ),
    [result],
  );
  const moveTo = useCallback(
    (piece: PlacedPiece, dx: number, dy: number, turn = 0) => {
      if (result) place(movedPlacements(result.pieces, piece.number, dx, dy, turn));
    },
    [result, place],
  );
  const sel = result?.pieces.find((p) => p.number === selected);

  return (
    <div className="grid gap-4 md:grid-cols-[16rem_minmax(0,1fr)] xl:grid-cols-[18rem_minmax(0,1fr)_18rem]">
      <div className="space-y-3">
        <TemplatePicker
          templates={templates}
          applied={applied}
          onApply={applyTemplate}
          values={values}
          canSave={canSaveTemplates}
          onSaved={setApplied}
        />
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
            <p className="p-4 text-sm text-muted">
              {problem ?? (ready ? "Building the preview…" : "Starting the engine in your browser…")}
            </p>
          )}
          {result?.stale ? (
            <p
              className="absolute left-2 top-2 rounded-card bg-surface/90 px-2 py-1 text-xs text-finding-error"
              data-testid="stale-preview"
            >
              ✕ This change cannot be built (see the findings); the view shows the last slab that could.
            </p>
          ) : null}
          <button type="button" className="btn-quiet absolute right-2 top-2 px-2 py-1 text-xs" onClick={() => setTop(!top)}>
            {top ? "Angled view" : "Top view"}
          </button>
        </div>
        <div className="card h-[20rem] p-2">
          {result?.layout ? (
            <PlateMap
              layout={result.layout}
              pieces={result.pieces}
              selected={selected}
              flagged={flagged}
              onSelect={setSelected}
              onMove={(p, dx, dy, turn) => moveTo(p, dx, dy, turn)}
            />
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
              <span>
                Piece {sel.number} · {sel.partName}
              </span>
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
        <FindingsPanel findings={result?.findings ?? null} onSelect={setSelected} />
        <EstimatesPanel preview={result} />
        {canMake ? (
          <MakePanel
            making={making}
            disabled={!check.success || !result || result.findings.some((f) => f.severity === "error") || busy}
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
        {ready ? (
          <p className="text-xs text-muted">
            Engine ready in {ready.ms.toFixed(0)} ms · {ready.triangles.toLocaleString("en-US")} part triangles
          </p>
        ) : null}
      </aside>
    </div>
  );
}
