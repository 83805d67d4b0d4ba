"use server";

import { redirect } from "next/navigation";
import { z } from "zod";
import { signOut } from "@/lib/auth/config";
import { loadCaller, setActiveWorkspace } from "@/lib/auth/guards";
import { HOME } from "@/lib/auth/landing";

const switchSchema = z.object({ workspaceId: z.string().uuid() });

/** Make another of the caller's workspaces the active one; membership is checked against the database. */
export async function switchWorkspace(form: FormData): Promise<void> {
  const parsed = switchSchema.safeParse({ workspaceId: form.get("workspaceId") });
  const caller = await loadCaller();
  if (!caller) redirect("/sign-in");
  if (parsed.success && caller.workspaces.some((w) => w.id === parsed.data.workspaceId)) {
    await setActiveWorkspace(parsed.data.workspaceId);
  }
  redirect(HOME);
}

export async function signOutAction(): Promise<void> {
  await signOut({ redirectTo: "/" });
}
