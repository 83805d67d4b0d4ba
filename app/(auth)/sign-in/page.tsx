import type { Metadata } from "next";
import Link from "next/link";
import { redirect } from "next/navigation";
import { loadSessionUser } from "@/lib/auth/guards";
import { HOME } from "@/lib/auth/landing";
import { SignInForm } from "./_components/sign-in-form";

export const metadata: Metadata = { title: "Sign in" };

export default async function SignInPage({ searchParams }: { searchParams: Promise<{ next?: string; email?: string; error?: string }> }) {
  const { next, email, error } = await searchParams;
  if (await loadSessionUser()) redirect(next?.startsWith("/") ? next : HOME);
  return (
    <div>
      <h1 className="text-xl">Sign in to your workshop</h1>
      <p className="mt-2 text-sm text-muted">
        New here?{" "}
        <Link
          href={
            `/sign-up${next ? `?next=${encodeURIComponent(next)}` : ""}` +
            `${email ? `${next ? "&" : "?"}email=${encodeURIComponent(email)}` : ""}`
          }
          className="text-accent underline"
        >
          Create an account
        </Link>
        . The demo workshop&apos;s sign-ins are printed by <code className="font-mono">npm start</code>.
      </p>
      {error === "Verification" ? (
        <p className="mt-4 rounded-card border border-finding-error/40 px-3 py-2 text-sm text-finding-error">
          ✕ That sign-in link has expired or was already used. Ask for a new one below.
        </p>
      ) : null}
      <div className="mt-6">
        <SignInForm next={next} email={email} />
      </div>
    </div>
  );
}
