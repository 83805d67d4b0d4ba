"use client";

import { useRouter } from "next/navigation";
import { ActionButton } from "@/app/_components/action-button";
import { acceptInvite } from "@/app/(auth)/actions";
import { LANDING } from "@/lib/auth/landing";

export function AcceptButton({ token, workspace }: { token: string; workspace: string }) {
  const router = useRouter();
  return (
    <ActionButton
      label={`Join ${workspace}`}
      pendingLabel="Joining…"
      run={() => acceptInvite({ token })}
      onOk={(r) => router.push(LANDING[r.role])}
    />
  );
}
