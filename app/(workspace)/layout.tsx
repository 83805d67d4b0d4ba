import Link from "next/link";
import type { ReactNode } from "react";
import { billingOf } from "@/lib/billing/service";
import { loadSessionUser, requireCaller } from "@/lib/auth/guards";
import { ToastProvider } from "../_components/toasts";
import { TopBar } from "./_components/top-bar";

export default async function WorkspaceLayout({ children }: { children: ReactNode }) {
  // Signed out: every page here sends the visitor to sign in itself (some with the way back, such as
  // a plate's inspection page opened from the QR code on its sheet), so the layout does not redirect.
  if (!(await loadSessionUser())) return <>{children}</>;
  const caller = await requireCaller();
  const billing = await billingOf(caller);
  return (
    <ToastProvider>
      <div className="min-h-screen">
        <TopBar caller={caller} />
        {billing.status === "grace" ? (
          <p
            className="border-b border-finding-error/40 bg-finding-error/10 px-4 py-2 text-center text-sm print:hidden"
            role="status"
            data-testid="billing-banner"
          >
            A payment for the {billing.effective.name} plan failed. The plan holds until {billing.graceUntil?.toISOString().slice(0, 10)};
            after that the workspace moves to the Bench plan.{" "}
            {caller.role === "owner" ? (
              <Link href="/settings/billing" className="underline">
                Update the payment
              </Link>
            ) : (
              "An owner can update the payment."
            )}
          </p>
        ) : null}
        {/* The slab editor (marked data-wide) takes the full width; lists keep the centred column. */}
        <main className="mx-auto max-w-column px-4 py-6 has-[[data-wide]]:max-w-[110rem]">{children}</main>
      </div>
    </ToastProvider>
  );
}
