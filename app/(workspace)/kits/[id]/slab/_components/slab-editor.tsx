"use client";

import dynamic from "next/dynamic";
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import type { PlacedPiece, PlateLayout } from "@/lib/geometry/build-plate";
import type { Finding } from "@/lib/geometry/checks";
import type { Estimates } from "@/lib/geometry/estimates";
import { MATERIALS, slabOptionsSchema, type SlabOptionsInput } from "@/lib/geometry/options";
import { makePlateAction } from "../../../actions";
import { PlateMap } from "./plate-map";
import type { Body, EditorPart, FromWorker } from "./protocol";

const View3D = dynamic(() => import("./view-3d").then((m) => m.View3D), { ssr: false, loading: () => <p className="p-4 text-sm text-muted">Loading the 3D view…</p> });

const BEDS = [[180, 180], [220, 220], [235, 235], [250, 210], [256, 256], [300, 300], [350, 350], [400, 400]] as const;

type Form = {
  shape: "rounded-rect" | "disc" | "contour";
  thickness: number;
  gap: number;
  cornerRadius: number;
  margin: number;
  spacing: number;
  bed: string;
  bedWidth: number;
  bedDepth: number;
  copies: number;
  material: keyof typeof MATERIALS;
  nozzle: number;
  layerHeight: number;
  pricePerKg: number;
  text1: string;
  text1Size: number;
  text2: string;
  text2Size: number;
  font: "sans-bold" | "mono-bold";
  relief: "engrave" | "emboss";
  qr: string;
  qrModule: number;
  qrLevel: "L" | "M" | "Q" | "H";
  numbers: boolean;
  outlines: "ring" | "pocket" | "none";
  order: string;
  customer: string;
};

const DEFAULT_FORM: Form = {
  shape: "rounded-rect", thickness: 1, gap: 0.25, cornerRadius: 5, margin: 4, spacing: 3, bed: "220x220", bedWidth: 220, bedDepth: 220, copies: 1,
  material: "PLA", nozzle: 0.4, layerHeight: 0.2, pricePerKg: 25, text1: "ORDER {order}", text1Size: 5, text2: "Thank you, {customer}!", text2Size: 4, font: "sans-bold", relief: "engrave",
  qr: "", qrModule: 1.2, qrLevel: "M", numbers: true, outlines: "ring", order: "10482", customer: "Sam",
};

function toOptions(f: Form, placements?: { piece: number; x: number; y: number; rotation: number }[]): SlabOptionsInput {
  const [w, d] = f.bed === "custom" ? [f.bedWidth, f.bedDepth] : f.bed.split("x").map(Number);
  const text = [
    f.text1.trim() ? { value: f.text1, size: f.text1Size, font: f.font, relief: f.relief } : null,
    f.text2.trim() ? { value: f.text2, size: f.text2Size, font: f.font, relief: f.relief } : null,
  ].filter((t): t is NonNullable<typeof t> => t !== null);
  return {
    slab: { shape: f.shape, thickness: f.thickness, gap: f.gap, cornerRadius: f.cornerRadius, margin: f.margin },
    layout: { spacing: f.spacing, bed: { width: w!, depth: d! }, copies: f.copies, ...(placements ? { placements } : {}) },
    marks: { text, ...(f.qr.trim() ? { qr: { value: f.qr, module: f.qrModule, level: f.qrLevel } } : {}), numbers: f.numbers, outlines: f.outlines },
    material: f.material,
    nozzle: f.nozzle,
    layerHeight: f.layerHeight,
    pricePerKg: f.pricePerKg,
  };
}

function Num({ label, unit, value, step, onChange, error, testId }: { label: string; unit?: string; value: number; step: number; onChange: (v: number) => void; error?: string; testId?: string }) {
  return (
    <label className="block text-xs text-muted">
      {label}
      {unit ? <span className="ml-1">({unit})</span> : null}
      <input type="number" step={step} value={Number.isFinite(value) ? value : ""} onChange={(e) => onChange(e.target.valueAsNumber)} className="field-input mt-0.5 py-1 text-sm" aria-invalid={Boolean(error)} data-testid={testId} />
      {error ? <span className="mt-0.5 block text-finding-error">{error}</span> : null}
    </label>
  );
}

const icon = { error: "✕", warning: "⚠", info: "ℹ" } as const;
const tone = { error: "text-finding-error", warning: "text-finding-warning", info: "text-finding-info" } as const;

export function SlabEditor({ kitId, kitName, parts, canMake }: { kitId: string; kitName: string; parts: EditorPart[]; canMake: boolean }) {
  const [form, setForm] = useState<Form>(DEFAULT_FORM);
  type Placements = { piece: number; x: number; y: number; rotation: number }[] | undefined;
  // Layout moves with undo and redo: `past` holds earlier layouts, `future` the undone ones.
  const [placements, setPlacementsNow] = useState<Placements>();
  const [past, setPast] = useState<Placements[]>([]);
  const [future, setFuture] = useState<Placements[]>([]);
  const setPlacements = useCallback(
    (next: Placements) => {
      setPast((p) => [...p.slice(-49), placements]);
      setFuture([]);
      setPlacementsNow(next);
    },
    [placements],
  );
  const undo = useCallback(() => {
    if (!past.length) return;
    setFuture((f) => [placements, ...f]);
    setPlacementsNow(past[past.length - 1]);
    setPast((p) => p.slice(0, -1));
  }, [past, placements]);
  const redo = useCallback(() => {
    if (!future.length) return;
    setPast((p) => [...p, placements]);
    setPlacementsNow(future[0]);
    setFuture((f) => f.slice(1));
  }, [future, placements]);
  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      if (!(e.ctrlKey || e.metaKey) || (e.target as HTMLElement).closest("input, select, textarea")) return;
      if (e.key.toLowerCase() === "z" && !e.shiftKey) (e.preventDefault(), undo());
      else if (e.key.toLowerCase() === "y" || (e.key.toLowerCase() === "z" && e.shiftKey)) (e.preventDefault(), redo());
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, [undo, redo]);
  const [result, setResult] = useState<{ bodies: Body[]; stale?: boolean; pieces: PlacedPiece[]; layout: PlateLayout | null; findings: Finding[]; estimates: Estimates | null; ms: number } | null>(null);
  const [ready, setReady] = useState<{ ms: number; triangles: number } | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const [selected, setSelected] = useState<number | undefined>();
  const [top, setTop] = useState(false);
  const [making, setMaking] = useState<{ plateId?: string; progress: number; status: string; message?: string } | null>(null);
  const worker = useRef<Worker | null>(null);
  const seq = useRef(0);
  const sentAt = useRef(new Map<number, number>());
  const [latency, setLatency] = useState<number | null>(null);

  const options = useMemo(() => toOptions(form, placements), [form, placements]);
  const check = useMemo(() => slabOptionsSchema.safeParse(options), [options]);
  const fieldError = (p: string) => (check.success ? undefined : check.error.issues.find((i) => i.path.join(".") === p)?.message);

  useEffect(() => {
    const w = new Worker(new URL("./slab.worker.ts", import.meta.url), { type: "module" });
    worker.current = w;
    w.onmessage = (e: MessageEvent<FromWorker>) => {
      const m = e.data;
      if (m.type === "ready") setReady({ ms: m.ms, triangles: m.triangles });
      else if (m.type === "error") setProblem(m.message);
      else if (m.seq === seq.current) {
        setProblem(null);
        // A build stopped by an error finding has no geometry: keep showing the last slab that built.
        setResult((prev) => ({ bodies: m.bodies.length ? m.bodies : (prev?.bodies ?? []), stale: m.bodies.length === 0 && Boolean(prev?.bodies.length), pieces: m.pieces, layout: m.layout ?? prev?.layout ?? null, findings: m.findings, estimates: m.estimates, ms: m.ms }));
        const t = sentAt.current.get(m.seq);
        // Option change → frame: measured to the next animation frame after the new meshes arrive.
        if (t !== undefined) requestAnimationFrame(() => setLatency(performance.now() - t));
      }
    };
    w.postMessage({ type: "init", parts });
    return () => w.terminate();
  }, [parts]);

  useEffect(() => {
    if (!check.success || !worker.current) return;
    const n = ++seq.current;
    sentAt.current.set(n, performance.now());
    worker.current.postMessage({ type: "build", seq: n, options, variables: { order: form.order, customer: form.customer, kit: kitName } });
  }, [options, check.success, form.order, form.customer, kitName]);

  const set = <K extends keyof Form>(k: K) => (v: Form[K]) => setForm((f) => ({ ...f, [k]: v }));
  const flagged = useMemo(() => new Set((result?.findings ?? []).filter((f) => f.severity !== "info").flatMap((f) => [f.piece, ...(f.pieces ?? [])]).filter((n): n is number => n !== undefined)), [result]);
  const moveTo = useCallback(
    (piece: PlacedPiece, dx: number, dy: number, dr = 0) => {
      if (!result) return;
      setPlacements(result.pieces.map((p) => ({ piece: p.slot, x: p.x + (p.number === piece.number ? dx : 0), y: p.y + (p.number === piece.number ? dy : 0), rotation: p.rotation + (p.number === piece.number ? dr : 0) })));
    },
    [result],
  );
  const sel = result?.pieces.find((p) => p.number === selected);

  async function make() {
    setMaking({ progress: 0, status: "queued" });
    const r = await makePlateAction({ kitId, options, variables: { order: form.order, customer: form.customer, kit: kitName } });
    if (!r.ok) return setMaking({ progress: 0, status: "failed", message: r.message });
    const plateId = r.data.plateId;
    for (;;) {
      const s = (await (await fetch(`/api/plates/${plateId}/status`)).json()) as { job: { status: string; progress: number; error: { message: string } | null } };
      setMaking({ plateId, progress: s.job.progress, status: s.job.status, message: s.job.error?.message });
      if (s.job.status === "done" || s.job.status === "failed") break;
      await new Promise((res) => setTimeout(res, 300));
    }
  }

  return (
    <div className="grid gap-4 md:grid-cols-[16rem_minmax(0,1fr)] xl:grid-cols-[18rem_minmax(0,1fr)_18rem]">
      <form className="card space-y-3 p-3 text-sm" aria-label="Slab options" onSubmit={(e) => e.preventDefault()}>
        <fieldset className="space-y-2">
          <legend className="font-bold">Slab</legend>
          <label className="block text-xs text-muted">
            Outline
            <select className="field-input mt-0.5 py-1 text-sm" value={form.shape} onChange={(e) => set("shape")(e.target.value as Form["shape"])} aria-label="Slab outline">
              <option value="rounded-rect">rounded rectangle</option>
              <option value="disc">disc</option>
              <option value="contour">follows the pieces</option>
            </select>
          </label>
          <div className="grid grid-cols-2 gap-2">
            <Num label="Thickness" unit="mm" step={0.1} value={form.thickness} onChange={set("thickness")} error={fieldError("slab.thickness")} />
            <Num label="Air gap" unit="mm" step={0.05} value={form.gap} onChange={set("gap")} error={fieldError("slab.gap")} testId="opt-gap" />
            <Num label="Corner radius" unit="mm" step={0.5} value={form.cornerRadius} onChange={set("cornerRadius")} error={fieldError("slab.cornerRadius")} />
            <Num label="Margin" unit="mm" step={0.5} value={form.margin} onChange={set("margin")} error={fieldError("slab.margin")} />
            <Num label="Spacing" unit="mm" step={0.5} value={form.spacing} onChange={set("spacing")} error={fieldError("layout.spacing")} testId="opt-spacing" />
            <Num label="Copies" step={1} value={form.copies} onChange={set("copies")} error={fieldError("layout.copies")} />
          </div>
          <label className="block text-xs text-muted">
            Bed
            <select className="field-input mt-0.5 py-1 text-sm" value={form.bed} onChange={(e) => set("bed")(e.target.value)} aria-label="Bed">
              {BEDS.map(([w, d]) => (
                <option key={`${w}x${d}`} value={`${w}x${d}`}>
                  {w} × {d} mm
                </option>
              ))}
              <option value="custom">custom size</option>
            </select>
          </label>
          {form.bed === "custom" ? (
            <div className="grid grid-cols-2 gap-2">
              <Num label="Bed width" unit="mm" step={1} value={form.bedWidth} onChange={set("bedWidth")} error={fieldError("layout.bed.width")} />
              <Num label="Bed depth" unit="mm" step={1} value={form.bedDepth} onChange={set("bedDepth")} error={fieldError("layout.bed.depth")} />
            </div>
          ) : null}
        </fieldset>
        <fieldset className="space-y-2">
          <legend className="font-bold">Print</legend>
          <div className="grid grid-cols-2 gap-2">
            <label className="block text-xs text-muted">
              Material
              <select className="field-input mt-0.5 py-1 text-sm" value={form.material} onChange={(e) => set("material")(e.target.value as Form["material"])} aria-label="Material">
                {Object.keys(MATERIALS).map((m) => (
                  <option key={m}>{m}</option>
                ))}
              </select>
            </label>
            <Num label="Nozzle" unit="mm" step={0.1} value={form.nozzle} onChange={set("nozzle")} error={fieldError("nozzle")} />
            <Num label="Layer height" unit="mm" step={0.02} value={form.layerHeight} onChange={set("layerHeight")} error={fieldError("layerHeight")} />
            <Num label="Price per kg" step={1} value={form.pricePerKg} onChange={set("pricePerKg")} error={fieldError("pricePerKg")} />
          </div>
        </fieldset>
        <fieldset className="space-y-2">
          <legend className="font-bold">Marks</legend>
          <label className="block text-xs text-muted">
            Text line 1
            <input className="field-input mt-0.5 py-1 text-sm" value={form.text1} onChange={(e) => set("text1")(e.target.value)} aria-label="Text line 1" />
          </label>
          <label className="block text-xs text-muted">
            Text line 2
            <input className="field-input mt-0.5 py-1 text-sm" value={form.text2} onChange={(e) => set("text2")(e.target.value)} aria-label="Text line 2" />
          </label>
          <div className="grid grid-cols-2 gap-2">
            <Num label="Line 1 size" unit="mm" step={0.5} value={form.text1Size} onChange={set("text1Size")} error={fieldError("marks.text.0.size")} />
            <Num label="Line 2 size" unit="mm" step={0.5} value={form.text2Size} onChange={set("text2Size")} />
            <label className="block text-xs text-muted">
              Face
              <select className="field-input mt-0.5 py-1 text-sm" value={form.font} onChange={(e) => set("font")(e.target.value as Form["font"])}>
                <option value="sans-bold">sans bold</option>
                <option value="mono-bold">mono bold</option>
              </select>
            </label>
            <label className="block text-xs text-muted">
              Relief
              <select className="field-input mt-0.5 py-1 text-sm" value={form.relief} onChange={(e) => set("relief")(e.target.value as Form["relief"])}>
                <option value="engrave">engraved</option>
                <option value="emboss">embossed</option>
              </select>
            </label>
          </div>
          <label className="block text-xs text-muted">
            QR code says (empty: none)
            <input className="field-input mt-0.5 py-1 text-sm" value={form.qr} onChange={(e) => set("qr")(e.target.value)} aria-label="QR value" placeholder="https://shop.example/o/{order}" />
          </label>
          {form.qr ? (
            <div className="grid grid-cols-2 gap-2">
              <Num label="Module" unit="mm" step={0.1} value={form.qrModule} onChange={set("qrModule")} error={fieldError("marks.qr.module")} />
              <label className="block text-xs text-muted">
                Error correction
                <select className="field-input mt-0.5 py-1 text-sm" value={form.qrLevel} onChange={(e) => set("qrLevel")(e.target.value as Form["qrLevel"])}>
                  {(["L", "M", "Q", "H"] as const).map((l) => (
                    <option key={l}>{l}</option>
                  ))}
                </select>
              </label>
            </div>
          ) : null}
          <div className="grid grid-cols-2 gap-2">
            <label className="flex items-center gap-2 text-xs">
              <input type="checkbox" checked={form.numbers} onChange={(e) => set("numbers")(e.target.checked)} /> numbers
            </label>
            <select className="field-input py-1 text-sm" value={form.outlines} onChange={(e) => set("outlines")(e.target.value as Form["outlines"])} aria-label="Piece outlines">
              <option value="ring">outline rings</option>
              <option value="pocket">pockets</option>
              <option value="none">no outlines</option>
            </select>
          </div>
          <div className="grid grid-cols-2 gap-2">
            <label className="block text-xs text-muted">
              {"{order}"} sample
              <input className="field-input mt-0.5 py-1 text-sm" value={form.order} onChange={(e) => set("order")(e.target.value)} />
            </label>
            <label className="block text-xs text-muted">
              {"{customer}"} sample
              <input className="field-input mt-0.5 py-1 text-sm" value={form.customer} onChange={(e) => set("customer")(e.target.value)} />
            </label>
          </div>
        </fieldset>
      </form>

      <div className="space-y-3">
        <div className="card relative h-[22rem] overflow-hidden bg-paper">
          {result?.bodies.length && result.layout ? (
            <View3D bodies={result.bodies} size={result.layout.slab} top={top} selected={selected} flagged={flagged} onPick={setSelected} />
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
            <PlateMap layout={result.layout} pieces={result.pieces} selected={selected} flagged={flagged} onSelect={setSelected} onMove={(p, dx, dy) => moveTo(p, dx, dy)} />
          ) : (
            <p className="p-2 text-sm text-muted">The plate map appears with the first preview.</p>
          )}
        </div>
        <div className="flex flex-wrap items-center gap-2 text-xs">
          <button type="button" className="btn-quiet px-2 py-1" disabled={!placements} onClick={() => setPlacements(undefined)}>
            Automatic layout
          </button>
          <button type="button" className="btn-quiet px-2 py-1" disabled={!past.length} onClick={undo} title="Ctrl+Z">
            Undo
          </button>
          <button type="button" className="btn-quiet px-2 py-1" disabled={!future.length} onClick={redo} title="Ctrl+Y">
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
          <span className="ml-auto text-muted" data-testid="preview-ms">
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
            <button type="button" className="btn-primary w-full" disabled={!check.success || !result || result.findings.some((f) => f.severity === "error") || (making !== null && making.status !== "done" && making.status !== "failed")} onClick={() => void make()}>
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
              {MATERIALS[form.material].styrene ? <li className="text-finding-warning">⚠ {form.material} gives off styrene and fine particles while printing: ventilate the room.</li> : null}
              {result?.findings.some((f) => f.code === "small_part") ? <li className="text-finding-warning">⚠ Small parts: not for children under 3; follow the rules where you sell.</li> : null}
            </ul>
          </section>
        ) : null}
        {ready ? <p className="text-xs text-muted">Engine ready in {ready.ms.toFixed(0)} ms · {ready.triangles.toLocaleString("en-US")} part triangles</p> : null}
      </aside>
    </div>
  );
}
