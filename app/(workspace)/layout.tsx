import type { ReactNode } from "react";
import { loadSessionUser, requireCaller } from "@/lib/auth/guards";
import { ToastProvider } from "../_components/toasts";
import { TopBar } from "./_components/top-bar";

export default async function WorkspaceLayout({ children }: { children: ReactNode }) {
  // Signed out: every page here sends the visitor to sign in itself (some with the way back, such as
  // a plate's inspection page opened from the QR code on its sheet), so the layout does not redirect.
  if (!(await loadSessionUser())) return <>{children}</>;
  const caller = await requireCaller();
  return (
    <ToastProvider>
      <div className="min-h-screen">
        <TopBar caller={caller} />
        <main className="mx-auto max-w-column px-4 py-6">{children}</main>
      </div>
    </ToastProvider>
  );
}
