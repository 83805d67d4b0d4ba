import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { loadCaller } from "@/lib/auth/guards";
import { SignInForm } from "./_components/sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage() {
  if (await loadCaller()) redirect("/parts");
  return (
    <div>
      <h1 className="text-xl">Sign in to your workshop</h1>
      <p className="mt-2 text-sm text-muted">The demo workshop&apos;s sign-ins are printed by <code className="font-mono">npm start</code> and listed in the README.</p>
      <div className="mt-6">
        <SignInForm />
      </div>
    </div>
  );
}
