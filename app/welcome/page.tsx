import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { Brand } from "@/app/_components/brand";
import { callerFor, loadSessionUser } from "@/lib/auth/guards";
import { WorkspaceForm } from "./_components/workspace-form";

export const metadata: Metadata = { title: "Welcome" };

/** For someone signed in who belongs to no workspace yet (a first e-mailed link, or removed from their last one). */
export default async function WelcomePage() {
  const user = await loadSessionUser();
  if (!user) redirect("/sign-in");
  if (await callerFor(user)) redirect("/parts");
  return (
    <div className="flex min-h-screen flex-col">
      <header className="border-b border-hairline bg-surface">
        <div className="mx-auto flex max-w-column items-center px-4 py-3">
          <Brand />
        </div>
      </header>
      <main className="mx-auto w-full max-w-md flex-1 px-4 py-10">
        <h1 className="text-xl">Welcome, {user.name ?? user.email}</h1>
        <p className="mt-2 text-sm text-muted">You are not in any workshop yet. Create your own, or open the invitation link a workshop owner sent you.</p>
        <div className="mt-6">
          <WorkspaceForm />
        </div>
      </main>
    </div>
  );
}
