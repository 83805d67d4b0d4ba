import type { Metadata } from "next";
import Link from "next/link";

export const metadata: Metadata = { title: "Check your e-mail" };

export default function CheckEmailPage() {
  return (
    <div className="card p-6">
      <h1 className="text-xl">Check your e-mail</h1>
      <p className="mt-2 text-sm text-muted">We sent you a sign-in link. It works once, for 15 minutes. You can close this page.</p>
      <p className="mt-4 text-sm">
        <Link href="/sign-in" className="text-accent hover:underline">
          Back to sign in
        </Link>
      </p>
    </div>
  );
}
