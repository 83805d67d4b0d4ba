import type { Metadata } from "next";
import Link from "next/link";
import { pendingSignUpByToken, SIGN_UP_LINK_MESSAGES } from "@/lib/accounts/sign-up";
import { FinishButton } from "./_components/finish-button";

export const metadata: Metadata = { title: "Finish creating your account" };
export const dynamic = "force-dynamic";

/**
 * Opened from the sign-up e-mail. Nothing happens on the visit itself (mail scanners open links):
 * the account is made when its owner presses the button.
 */
export default async function FinishSignUpPage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const pending = await pendingSignUpByToken(token);
  return (
    <div className="card p-6">
      <h1 className="text-xl">Finish creating your account</h1>
      {pending.state === "valid" ? (
        <>
          <p className="mt-2 text-sm text-muted">
            The account for <strong className="text-ink">{pending.email}</strong> is made when you press the button, with the name and
            password you chose.
          </p>
          <div className="mt-4">
            <FinishButton token={token} />
          </div>
        </>
      ) : (
        <>
          <p className="mt-2 text-sm" data-testid="sign-up-link-problem">
            {SIGN_UP_LINK_MESSAGES[pending.state]}
          </p>
          <p className="mt-4 text-sm">
            <Link href={pending.state === "used" ? "/sign-in" : "/sign-up"} className="text-accent underline">
              {pending.state === "used" ? "Sign in" : "Sign up again"}
            </Link>
          </p>
        </>
      )}
    </div>
  );
}
