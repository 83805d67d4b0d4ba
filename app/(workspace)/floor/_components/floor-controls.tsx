"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { useToast } from "@/app/_components/toasts";
import type { FloorState, PieceCheck } from "@/db/schema";
import { inspectAction, movePlateAction, reprintAction } from "../actions";

const LABEL: Record<FloorState, string> = {
  to_print: "Back to print",
  printing: "Printing",
  print_failed: "Print failed",
  to_inspect: "Printed: to inspect",
  reprint_needed: "Reprint needed",
  done: "Done",
};

const CHOICE = "flex-1 cursor-pointer rounded-card border px-2 py-2 text-center text-sm";
/** How a chosen state looks: present quietly marked, a problem loudly. */
const CHOSEN = {
  present: "border-accent bg-accent/10",
  missing: "border-finding-error bg-finding-error/10 font-bold",
  defective: "border-finding-error bg-finding-error/10 font-bold",
} as const;

function useRun() {
  const toast = useToast();
  const router = useRouter();
  const [pending, start] = useTransition();
  const run = (f: () => Promise<{ ok: boolean; message?: string; data?: unknown }>, then?: (data: unknown) => void) =>
    start(async () => {
      const r = await f();
      toast(r.ok ? "done" : "problem", r.message ?? "");
      if (r.ok) then?.(r.data);
      router.refresh();
    });
  return { run, pending };
}

export function MoveButtons({ id, from, moves }: { id: string; from: FloorState; moves: FloorState[] }) {
  const { run, pending } = useRun();
  return (
    <span className="inline-flex flex-wrap gap-1">
      {moves.map((to) => (
        <button
          key={to}
          type="button"
          className="btn-quiet px-2 py-1 text-xs"
          disabled={pending}
          onClick={() => run(() => movePlateAction({ id, to }))}
        >
          {to === "to_inspect" && (from === "reprint_needed" || from === "done") ? "Inspect again" : LABEL[to]}
        </button>
      ))}
    </span>
  );
}

type Piece = { number: number; partName: string; copy: number };

/** Mark each piece present, missing or defective (with a note), or all present at once. */
export function InspectionForm({ id, pieces, canInspect }: { id: string; pieces: Piece[]; canInspect: boolean }) {
  const { run, pending } = useRun();
  const [checks, setChecks] = useState<Record<number, PieceCheck>>({});
  const set = (n: number, state: PieceCheck["state"]) => setChecks((c) => ({ ...c, [n]: { ...c[n], number: n, state } }));
  const marked = Object.values(checks).filter((c) => c.state !== "present");
  if (!canInspect) return <p className="text-sm text-muted">Your role can look at plates but not record inspections.</p>;
  return (
    <div className="space-y-3">
      <button
        type="button"
        className="btn-primary w-full py-3 text-base"
        disabled={pending || marked.length > 0}
        onClick={() => run(() => inspectAction({ id, checks: "all-present" }))}
      >
        All {pieces.length} pieces present
      </button>
      <p className="text-center text-xs text-muted">or mark what is wrong, then record:</p>
      <ul className="divide-y divide-hairline rounded-card border border-hairline" aria-label="Pieces">
        {pieces.map((p) => {
          const c = checks[p.number]?.state ?? "present";
          return (
            <li key={p.number} className="space-y-1.5 p-2" data-testid={`inspect-piece-${p.number}`}>
              <div className="flex items-center gap-2">
                <span className="w-8 font-mono text-lg font-bold">{p.number}</span>
                <span className="grow text-sm">
                  {p.partName}
                  {p.copy > 1 ? <span className="text-muted"> · copy {p.copy}</span> : null}
                </span>
              </div>
              <fieldset className="flex gap-1" aria-label={`Piece ${p.number}`}>
                {(["present", "missing", "defective"] as const).map((s) => (
                  <label key={s} className={`${CHOICE} ${c === s ? CHOSEN[s] : "border-hairline"}`}>
                    <input
                      type="radio"
                      className="sr-only"
                      name={`piece-${p.number}`}
                      checked={c === s}
                      onChange={() => set(p.number, s)}
                      aria-label={`Piece ${p.number} ${s}`}
                    />
                    {s}
                  </label>
                ))}
              </fieldset>
              {c !== "present" ? (
                <input
                  className="field-input py-1 text-sm"
                  placeholder={c === "defective" ? "What is wrong (required)" : "Note (optional)"}
                  aria-label={`Note for piece ${p.number}`}
                  value={checks[p.number]?.note ?? ""}
                  onChange={(e) => setChecks((all) => ({ ...all, [p.number]: { ...all[p.number]!, note: e.target.value } }))}
                />
              ) : null}
            </li>
          );
        })}
      </ul>
      <button
        type="button"
        className="btn-quiet w-full py-2"
        disabled={pending}
        onClick={() => run(() => inspectAction({ id, checks: Object.values(checks) }))}
      >
        Record the inspection{marked.length ? ` (${marked.length} to reprint)` : ""}
      </button>
    </div>
  );
}

export function ReprintButton({ id, count }: { id: string; count: number }) {
  const { run, pending } = useRun();
  const router = useRouter();
  return (
    <button
      type="button"
      className="btn-primary w-full py-2"
      disabled={pending}
      onClick={() =>
        run(
          () => reprintAction({ id }),
          (d) => router.push(`/floor/plates/${(d as { plateId: string }).plateId}`),
        )
      }
    >
      Make the reprint ({count} piece{count > 1 ? "s" : ""})
    </button>
  );
}
