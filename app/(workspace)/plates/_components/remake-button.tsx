"use client";

import { useRouter } from "next/navigation";
import { useTransition } from "react";
import { useToast } from "@/app/_components/toasts";
import { remakePlateAction } from "../../kits/actions";

export function RemakeButton({ plateId }: { plateId: string }) {
  const toast = useToast();
  const router = useRouter();
  const [pending, start] = useTransition();
  return (
    <button
      type="button"
      className="btn-quiet px-2 py-0.5 text-xs"
      disabled={pending}
      title="The same parts, options, values and template version"
      onClick={() =>
        start(async () => {
          const r = await remakePlateAction({ plateId });
          toast(r.ok ? "done" : "problem", r.message ?? "");
          router.refresh();
        })
      }
    >
      Make again
    </button>
  );
}
