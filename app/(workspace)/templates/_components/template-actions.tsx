"use client";

import { useRouter } from "next/navigation";
import { useTransition } from "react";
import { useToast } from "@/app/_components/toasts";
import { archiveTemplateAction, duplicateTemplateAction, restoreTemplateVersionAction } from "../actions";

type Result = { ok: true; message?: string; data?: unknown } | { ok: false; message: string };

function useRun() {
  const toast = useToast();
  const router = useRouter();
  const [pending, start] = useTransition();
  const run = (f: () => Promise<Result>, then?: (r: Result) => void) =>
    start(async () => {
      const r = await f();
      toast(r.ok ? "done" : "problem", r.message ?? (r.ok ? "Done." : "That did not work."));
      if (r.ok) {
        then?.(r);
        router.refresh();
      }
    });
  return { run, pending };
}

export function DuplicateButton({ id, name }: { id: string; name: string }) {
  const { run, pending } = useRun();
  const router = useRouter();
  return (
    <button
      type="button"
      className="btn-quiet px-2 py-1 text-xs"
      disabled={pending}
      aria-label={`Duplicate ${name}`}
      onClick={() =>
        run(
          () => duplicateTemplateAction({ id }),
          (r) => r.ok && router.push(`/templates/${(r.data as { id: string }).id}`),
        )
      }
    >
      Duplicate
    </button>
  );
}

export function ArchiveButton({ id, name, archived }: { id: string; name: string; archived: boolean }) {
  const { run, pending } = useRun();
  return (
    <button
      type="button"
      className="btn-quiet px-2 py-1 text-xs"
      disabled={pending}
      aria-label={`${archived ? "Unarchive" : "Archive"} ${name}`}
      onClick={() => run(() => archiveTemplateAction({ id, archived: !archived }))}
    >
      {archived ? "Unarchive" : "Archive"}
    </button>
  );
}

export function RestoreButton({ id, version }: { id: string; version: number }) {
  const { run, pending } = useRun();
  return (
    <button
      type="button"
      className="btn-quiet px-2 py-1 text-xs"
      disabled={pending}
      onClick={() => run(() => restoreTemplateVersionAction({ id, version }))}
    >
      Restore this version
    </button>
  );
}
