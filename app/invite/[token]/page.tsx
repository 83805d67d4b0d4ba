import type { Metadata } from "next";
import Link from "next/link";
import { NarrowPage } from "@/app/_components/narrow-page";
import { invitationByToken, INVITATION_MESSAGES } from "@/lib/accounts/invitations";
import { loadSessionUser } from "@/lib/auth/guards";
import { ROLE_LABEL } from "@/lib/auth/permissions";
import { AcceptButton } from "./_components/accept-button";

export const metadata: Metadata = { title: "Invitation" };
export const dynamic = "force-dynamic";

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const { state, invitation } = await invitationByToken(token);
  const user = await loadSessionUser();
  const here = `/invite/${token}`;
  return (
    <NarrowPage>
      <div className="card space-y-4 p-6">
        {state !== "valid" || !invitation ? (
          <>
            <h1 className="text-xl">This invitation cannot be used</h1>
            <p className="text-sm text-finding-error" data-testid="invite-problem">
              ✕ {INVITATION_MESSAGES[state === "valid" ? "unknown" : state]}
            </p>
            <Link href="/sign-in" className="btn-quiet">
              Go to sign in
            </Link>
          </>
        ) : (
          <>
            <h1 className="text-xl">Join {invitation.workspaceName}</h1>
            <p className="text-sm text-muted">
              You are invited as <strong className="text-ink">{invitation.role}</strong>: {ROLE_LABEL[invitation.role].split("— ")[1]}. The
              invitation is for {invitation.email}.
            </p>
            {user ? (
              user.email.toLowerCase() === invitation.email.toLowerCase() ? (
                <AcceptButton token={token} workspace={invitation.workspaceName} />
              ) : (
                <p className="text-sm text-finding-error">
                  ✕ You are signed in as {user.email}. Sign out and sign in as {invitation.email} to accept.
                </p>
              )
            ) : (
              <div className="flex flex-wrap gap-3">
                <Link
                  className="btn-primary"
                  href={`/sign-up?next=${encodeURIComponent(here)}&email=${encodeURIComponent(invitation.email)}`}
                >
                  Create an account to join
                </Link>
                <Link
                  className="btn-quiet"
                  href={`/sign-in?next=${encodeURIComponent(here)}&email=${encodeURIComponent(invitation.email)}`}
                >
                  I have an account
                </Link>
              </div>
            )}
          </>
        )}
      </div>
    </NarrowPage>
  );
}
