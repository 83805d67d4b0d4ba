"use client";

import { useRouter } from "next/navigation";
import { useTransition } from "react";
import { archiveKitAction, duplicateKitAction } from "../actions";

export function KitRowActions({ id, name }: { id: string; name: string }) {
  const router = useRouter();
  const [busy, start] = useTransition();
  return (
    <span className="space-x-1">
      <button
        type="button"
        className="btn-quiet px-2 py-1"
        disabled={busy}
        onClick={() =>
          start(async () => {
            await duplicateKitAction({ id });
            router.refresh();
          })
        }
      >
        Duplicate
      </button>
      <button
        type="button"
        className="btn-quiet px-2 py-1"
        disabled={busy}
        onClick={() => {
          if (confirm(`Archive ${name}? Its plates stay.`))
            start(async () => {
              await archiveKitAction({ id });
              router.refresh();
            });
        }}
      >
        Archive
      </button>
    </span>
  );
}
