"use server";

import { redirect } from "next/navigation";
import { changePassword, endAllSessions } from "@/lib/accounts/passwords";
import { signIn, signOut } from "@/lib/auth/config";
import { guardedAction, loadSessionUser } from "@/lib/auth/guards";
import { clientIp } from "@/lib/auth/request";
import { changePasswordSchema } from "@/lib/validation/accounts";

/** A new password ends every session; this browser signs in again with it and stays signed in. */
export const changeMyPassword = guardedAction(changePasswordSchema, null, "changing your password", async (input, caller) => {
  await changePassword(caller.user, input.current, input.password, await clientIp());
  await signIn("credentials", { email: caller.user.email, password: input.password, redirect: false });
  return { ok: true, data: undefined, message: "Password changed. Every other session has been signed out." };
});

/** Sign out every browser and device of this person, this one included. */
export async function signOutEverywhere(): Promise<void> {
  const user = await loadSessionUser();
  if (!user) redirect("/sign-in");
  await endAllSessions(user.id, await clientIp());
  await signOut({ redirectTo: "/sign-in" });
}
