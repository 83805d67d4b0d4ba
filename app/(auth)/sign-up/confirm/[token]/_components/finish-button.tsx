"use client";

import { useState, useTransition } from "react";
import { FormMessage } from "@/app/_components/form";
import { finishSignUpFromLink } from "@/app/(auth)/actions";

export function FinishButton({ token }: { token: string }) {
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
            // On success the action redirects (to the workshop, or back to an invitation).
            const res = await finishSignUpFromLink({ token });
            if (!res.ok) setMessage({ ok: false, text: res.message });
          })
        }
      >
        {pending ? "Creating your account…" : "Create my account"}
      </button>
    </div>
  );
}
