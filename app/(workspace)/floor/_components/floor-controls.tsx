"use client";

import { useRouter } from "next/navigation";
import { createContext, useContext, useEffect, useRef, useState, useTransition, type ReactNode } from "react";
import type { FloorState, PieceCheck } from "@/db/schema";
import { plural } from "@/lib/plural";
import { inspectAction, movePlateAction, reprintAction } from "../actions";

/** What each move's button says: what the operator does, not the state the plate ends in. */
const VERB: Record<FloorState, string> = {
  to_print: "Queue to print again",
  printing: "Start printing",
  print_failed: "Report a failed print",
  to_inspect: "Printed — inspect",
  reprint_needed: "Ask for a reprint",
  done: "Mark done",
};

function moveLabel(from: FloorState, to: FloorState): string {
  if (to === "to_inspect" && (from === "reprint_needed" || from === "done")) return "Inspect again";
  if (to === "printing" && from === "to_inspect") return "Back to printing";
  return VERB[to];
}

const CHOICE = "flex-1 cursor-pointer rounded-card border px-2 py-2 text-center text-sm";
/** How a chosen state looks: present quietly marked, a problem loudly. */
const CHOSEN = {
  present: "border-accent bg-accent/10",
  missing: "border-finding-error bg-finding-error/10 font-bold",
  defective: "border-finding-error bg-finding-error/10 font-bold",
} as const;

const TONE = { ok: "border-l-accent", problem: "border-l-finding-error text-finding-error" };

type Notice = { ok: boolean; text: string; at: number };
const NoticeContext = createContext<{ notice: Notice | null; say: (ok: boolean, text: string) => void }>({
  notice: null,
  say: () => {},
});

/**
 * The floor's results, one at a time: each new one replaces the last, shown in the page's flow where
 * FloorNoticeLine stands, so nothing floats over the buttons an operator needs next (on a phone too).
 */
export function FloorNotices({ children }: { children: ReactNode }) {
  const [notice, setNotice] = useState<Notice | null>(null);
  return (
    <NoticeContext.Provider value={{ notice, say: (ok, text) => setNotice({ ok, text, at: Date.now() }) }}>
      {children}
    </NoticeContext.Provider>
  );
}

/** Where the newest result is read (a polite live region; a problem is assertive). */
export function FloorNoticeLine() {
  const { notice } = useContext(NoticeContext);
  return (
    <div aria-live={notice && !notice.ok ? "assertive" : "polite"} data-testid="floor-notice">
      {notice ? (
        <p key={notice.at} className={`mb-3 rounded-card border-l-4 bg-surface px-3 py-2 text-sm ${notice.ok ? TONE.ok : TONE.problem}`}>
          {notice.ok ? "" : "✕ "}
          {notice.text}
        </p>
      ) : null}
    </div>
  );
}

type Result = { ok: boolean; message?: string; data?: unknown; fieldErrors?: Record<string, string[] | undefined> };

function useRun() {
  const { say } = useContext(NoticeContext);
  const router = useRouter();
  const [pending, start] = useTransition();
  const run = (f: () => Promise<Result>, then?: (r: Result) => void) =>
    start(async () => {
      const r = await f();
      if (r.message) say(r.ok, r.message);
      then?.(r);
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
          {moveLabel(from, to)}
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
  const [errors, setErrors] = useState<Record<number, string>>({});
  const notes = useRef<Record<number, HTMLInputElement | null>>({});
  const set = (n: number, state: PieceCheck["state"]) => setChecks((c) => ({ ...c, [n]: { ...c[n], number: n, state } }));
  const marked = Object.values(checks).filter((c) => c.state !== "present");
  // A field error is shown once the field exists; focus goes to the first one.
  const firstError = Object.keys(errors)
    .map(Number)
    .sort((a, b) => a - b)[0];
  useEffect(() => {
    if (firstError !== undefined) notes.current[firstError]?.focus();
  }, [firstError, errors]);
  if (!canInspect) return <p className="text-sm text-muted">Your role can look at plates but not record inspections.</p>;
  const record = () => {
    // The note a defective piece needs is asked for at that piece, before anything is sent.
    const missingNotes = Object.fromEntries(
      marked.filter((c) => c.state === "defective" && !c.note?.trim()).map((c) => [c.number, `Say what is wrong with piece ${c.number}.`]),
    );
    setErrors(missingNotes);
    if (Object.keys(missingNotes).length) return;
    run(
      () => inspectAction({ id, checks: Object.values(checks) }),
      (r) => {
        // The server's word on a note, at the same field.
        const fromServer = Object.entries(r.fieldErrors ?? {}).flatMap(([k, v]) => {
          const m = /^note-(\d+)$/.exec(k);
          return m && v?.[0] ? [[Number(m[1]), v[0]] as const] : [];
        });
        if (fromServer.length) setErrors(Object.fromEntries(fromServer));
      },
    );
  };
  return (
    <div className="space-y-3">
      <button
        type="button"
        className="btn-primary w-full py-3 text-base"
        disabled={pending || marked.length > 0}
        onClick={() => run(() => inspectAction({ id, checks: "all-present" }))}
      >
        {pieces.length === 1 ? "The piece is present" : `All ${pieces.length} pieces present`}
      </button>
      <p className="text-center text-xs text-muted">or mark what is wrong, then record:</p>
      <ul className="divide-y divide-hairline rounded-card border border-hairline" aria-label="Pieces">
        {pieces.map((p) => {
          const c = checks[p.number]?.state ?? "present";
          const error = c === "defective" ? errors[p.number] : undefined;
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
                <>
                  <input
                    ref={(el) => {
                      notes.current[p.number] = el;
                    }}
                    className={`field-input py-1 text-sm ${error ? "border-finding-error" : ""}`}
                    placeholder={c === "defective" ? "What is wrong (required)" : "Note (optional)"}
                    aria-label={`Note for piece ${p.number}`}
                    aria-invalid={error ? true : undefined}
                    aria-describedby={error ? `note-error-${p.number}` : undefined}
                    value={checks[p.number]?.note ?? ""}
                    onChange={(e) => {
                      const note = e.target.value;
                      setChecks((all) => ({ ...all, [p.number]: { ...all[p.number]!, note } }));
                      if (note.trim()) setErrors(({ [p.number]: _gone, ...rest }) => rest);
                    }}
                  />
                  {error ? (
                    <p id={`note-error-${p.number}`} className="text-xs text-finding-error" data-testid={`note-error-${p.number}`}>
                      ✕ {error}
                    </p>
                  ) : null}
                </>
              ) : null}
            </li>
          );
        })}
      </ul>
      <button type="button" className="btn-quiet w-full py-2" disabled={pending} onClick={record}>
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
          (r) => {
            if (r.ok) router.push(`/floor/plates/${(r.data as { plateId: string }).plateId}`);
          },
        )
      }
    >
      {pending ? "Making the reprint…" : `Make the reprint (${plural(count, "piece")})`}
    </button>
  );
}

/**
 * While a plate's files are being made, ask its status every two seconds and redraw the page when the
 * build ends (its map, inspection and floor state appear without a reload).
 */
export function PlateBuildWatch({ id, state }: { id: string; state: string }) {
  const router = useRouter();
  useEffect(() => {
    if (state === "done" || state === "failed") return;
    let stop = false;
    const tick = async () => {
      try {
        const r = await fetch(`/api/plates/${id}/status`, { cache: "no-store" });
        if (r.ok) {
          const { job } = (await r.json()) as { job: { status: string } };
          if (job.status !== state) {
            stop = true;
            router.refresh();
            return;
          }
        }
      } catch {
        // A dropped request is tried again on the next tick.
      }
      if (!stop) timer = setTimeout(tick, 2000);
    };
    let timer = setTimeout(tick, 2000);
    return () => {
      stop = true;
      clearTimeout(timer);
    };
  }, [id, state, router]);
  return null;
}
