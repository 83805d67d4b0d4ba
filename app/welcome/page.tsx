import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { NarrowPage } from "@/app/_components/narrow-page";
import { callerFor, loadSessionUser } from "@/lib/auth/guards";
import { HOME } from "@/lib/auth/landing";
import { WorkspaceForm } from "./_components/workspace-form";

export const metadata: Metadata = { title: "Welcome" };

/** For someone signed in who belongs to no workspace yet (a first e-mailed link, or removed from their last one). */
export default async function WelcomePage() {
  const user = await loadSessionUser();
  if (!user) redirect("/sign-in");
  if (await callerFor(user)) redirect(HOME);
  return (
    <NarrowPage>
      <h1 className="text-xl">Welcome, {user.name ?? user.email}</h1>
      <p className="mt-2 text-sm text-muted">
        You are not in any workshop yet. Create your own, or open the invitation link a workshop owner sent you.
      </p>
      <div className="mt-6">
        <WorkspaceForm />
      </div>
    </NarrowPage>
  );
}
