"use client";

import { useState, useTransition } from "react";
import { FormMessage } from "@/app/_components/form";
import type { ActionResult } from "@/lib/validation/accounts";

/**
 * One button that runs a server action and shows its refusal above itself; `onOk` follows a success
 * (an action that redirects never returns).
 */
export function ActionButton<T>({
  label,
  pendingLabel,
  run,
  onOk,
}: {
  label: string;
  pendingLabel: string;
  run: () => Promise<ActionResult<T>>;
  onOk?: (data: T) => void;
}) {
  const [pending, start] = useTransition();
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  return (
    <div className="space-y-3">
      <FormMessage message={message} />
      <button
        type="button"
        className="btn-primary"
        disabled={pending}
        onClick={() =>
          start(async () => {
            const res = await run();
            if (!res.ok) setMessage({ ok: false, text: res.message });
            else onOk?.(res.data);
          })
        }
      >
        {pending ? pendingLabel : label}
      </button>
    </div>
  );
}
