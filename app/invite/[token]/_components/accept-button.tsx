"use client";

import { useRouter } from "next/navigation";
import { useState, useTransition } from "react";
import { FormMessage } from "@/app/_components/form";
import { acceptInvite } from "@/app/(auth)/actions";

export function AcceptButton({ token, workspace }: { token: string; workspace: string }) {
  const router = useRouter();
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
            const res = await acceptInvite({ token });
            if (!res.ok) setMessage({ ok: false, text: res.message });
            else router.push("/parts");
          })
        }
      >
        {pending ? "Joining…" : `Join ${workspace}`}
      </button>
    </div>
  );
}
