import type { ReactNode } from "react";
import { Brand } from "./brand";

/** The frame of the short signed-out and setup pages: the brand bar and a narrow centred column. */
export function NarrowPage({ children, centred = false }: { children: ReactNode; centred?: boolean }) {
  return (
    <div className="flex min-h-screen flex-col">
      <header className="border-b border-hairline bg-surface">
        <div className="mx-auto flex max-w-column items-center px-4 py-3">
          <Brand />
        </div>
      </header>
      <main className={`mx-auto flex w-full max-w-md flex-1 flex-col px-4 py-10 ${centred ? "justify-center" : ""}`}>{children}</main>
    </div>
  );
}
