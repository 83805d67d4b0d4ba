import type { Metadata } from "next";
import Link from "next/link";

export const metadata: Metadata = { title: "Check your e-mail" };

export default async function CheckEmailPage({ searchParams }: { searchParams: Promise<{ for?: string }> }) {
  const { for: purpose } = await searchParams;
  const signUp = purpose === "sign-up";
  return (
    <div className="card p-6">
      <h1 className="text-xl">Check your e-mail</h1>
      <p className="mt-2 text-sm text-muted" data-testid="check-email-text">
        {signUp
          ? "We sent a message to the address you gave. Open the link in it to finish creating your account; it works once, for 24 " +
            "hours. If the address already has an account, the message says how to sign in instead."
          : "We sent you a sign-in link. It works once, for 15 minutes. You can close this page."}
      </p>
      <p className="mt-4 text-sm">
        <Link href="/sign-in" className="text-accent underline">
          Back to sign in
        </Link>
      </p>
    </div>
  );
}
