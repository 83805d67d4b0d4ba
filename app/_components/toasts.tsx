"use client";

import { createContext, useCallback, useContext, useEffect, useState, type ReactNode } from "react";

type Tone = "done" | "problem" | "note";
type Toast = { id: number; tone: Tone; text: string };
const ToastContext = createContext<(tone: Tone, text: string) => void>(() => {});

/**
 * Short notes about results ("plate made", "could not save"), shown at the bottom right for a few
 * seconds and read out by screen readers (a polite live region; problems are assertive).
 */
export function ToastProvider({ children }: { children: ReactNode }) {
  const [toasts, setToasts] = useState<Toast[]>([]);
  const push = useCallback((tone: Tone, text: string) => {
    setToasts((t) => [...t.slice(-3), { id: Date.now() + Math.random(), tone, text }]);
  }, []);
  return (
    <ToastContext.Provider value={push}>
      {children}
      <div
        className="pointer-events-none fixed bottom-4 right-4 z-50 flex w-80 max-w-[calc(100vw-2rem)] flex-col gap-2"
        aria-live="polite"
        data-testid="toasts"
      >
        {toasts.map((t) => (
          <ToastItem key={t.id} toast={t} onDone={() => setToasts((all) => all.filter((x) => x.id !== t.id))} />
        ))}
      </div>
    </ToastContext.Provider>
  );
}

function ToastItem({ toast, onDone }: { toast: Toast; onDone: () => void }) {
  useEffect(() => {
    const h = setTimeout(onDone, toast.tone === "problem" ? 9000 : 5000);
    return () => clearTimeout(h);
  }, [toast, onDone]);
  const edge = toast.tone === "done" ? "border-l-accent" : toast.tone === "problem" ? "border-l-finding-error" : "border-l-hairline";
  return (
    <div
      role={toast.tone === "problem" ? "alert" : "status"}
      className={`card pointer-events-auto flex items-start gap-2 border-l-4 ${edge} px-3 py-2 text-sm shadow-lg`}
    >
      <span className="grow">{toast.text}</span>
      <button type="button" className="text-muted hover:text-ink" aria-label="Dismiss" onClick={onDone}>
        ×
      </button>
    </div>
  );
}

export function useToast() {
  return useContext(ToastContext);
}
