"use client";

import { ActionButton } from "@/app/_components/action-button";
import { finishSignUpFromLink } from "@/app/(auth)/actions";

/** On success the action redirects (to the workshop, or back to an invitation). */
export function FinishButton({ token }: { token: string }) {
  return <ActionButton label="Create my account" pendingLabel="Creating your account…" run={() => finishSignUpFromLink({ token })} />;
}
