import { Brand } from "@/app/_components/brand";
import type { Caller } from "@/lib/auth/guards";
import { HOME } from "@/lib/auth/landing";
import { signOutAction, switchWorkspace } from "../actions";
import { SectionNav } from "./section-nav";

export function TopBar({ caller }: { caller: Caller }) {
  return (
    <header className="border-b border-hairline bg-surface print:hidden">
      <div className="mx-auto flex max-w-column flex-wrap items-center gap-x-4 gap-y-2 px-4 pt-3">
        <Brand href={HOME} />
        <form action={switchWorkspace} className="flex items-center gap-2 text-sm">
          <label htmlFor="workspace" className="sr-only">
            Workspace
          </label>
          <select
            id="workspace"
            name="workspaceId"
            defaultValue={caller.workspace.id}
            className="rounded-card border border-hairline bg-surface px-2 py-1"
          >
            {caller.workspaces.map((w) => (
              <option key={w.id} value={w.id}>
                {w.name}
              </option>
            ))}
          </select>
          {caller.workspaces.length > 1 ? (
            <button type="submit" className="btn-quiet px-2 py-1">
              Switch
            </button>
          ) : null}
        </form>
        <div className="ml-auto flex items-center gap-3 text-sm">
          <span className="text-muted" data-testid="whoami">
            {caller.user.name ?? caller.user.email} · {caller.role.charAt(0).toUpperCase() + caller.role.slice(1)}
          </span>
          <form action={signOutAction}>
            <button type="submit" className="btn-quiet px-3 py-1">
              Sign out
            </button>
          </form>
        </div>
      </div>
      <div className="mx-auto mt-2 max-w-column px-4">
        <SectionNav />
      </div>
    </header>
  );
}
