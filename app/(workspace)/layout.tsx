import type { ReactNode } from "react";
import { requireCaller } from "@/lib/auth/guards";
import { ToastProvider } from "../_components/toasts";
import { TopBar } from "./_components/top-bar";

export default async function WorkspaceLayout({ children }: { children: ReactNode }) {
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
