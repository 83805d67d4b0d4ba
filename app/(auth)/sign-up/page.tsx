import type { Metadata } from "next";
import Link from "next/link";
import { SignUpForm } from "./_components/sign-up-form";

export const metadata: Metadata = { title: "Create an account" };

export default async function SignUpPage({ searchParams }: { searchParams: Promise<{ next?: string; email?: string }> }) {
  const { next, email } = await searchParams;
  const invited = Boolean(next?.startsWith("/invite/"));
  return (
    <div>
      <h1 className="text-xl">Create your Slabwright account</h1>
      <p className="mt-2 text-sm text-muted">
        {invited ? "After this you will be taken back to your invitation." : "You get a workshop of your own to lay out kits in."} Already
        have an account?{" "}
        <Link href={`/sign-in${next ? `?next=${encodeURIComponent(next)}` : ""}`} className="text-accent underline">
          Sign in
        </Link>
        .
      </p>
      <div className="mt-6">
        <SignUpForm next={next} email={email} invited={invited} />
      </div>
    </div>
  );
}
