import type { ApiKeyScope, Role } from "@/db/schema";
import { PERMISSIONS, type Permission } from "./permissions";

/**
 * Who is acting in a workspace: the one identity every service and query takes. A signed-in member
 * (userId set, permissions from the role) or an order system's API key (apiKeyId set, permissions =
 * the key's scopes). Both guards return it; the session guard's Caller adds what pages show.
 */
export type WorkspaceActor = {
  workspaceId: string;
  userId: string | null;
  apiKeyId: string | null;
  permissions: readonly (Permission | ApiKeyScope)[];
};

/** Everything a role may do, from the one permissions table. */
export function permissionsOf(role: Role): Permission[] {
  return (Object.keys(PERMISSIONS) as Permission[]).filter((p) => (PERMISSIONS[p] as readonly Role[]).includes(role));
}

/** A stand-in actor for work the system does for a workspace by itself (the job worker, the seed). */
export function systemActor(workspaceId: string): WorkspaceActor {
  return { workspaceId, userId: null, apiKeyId: null, permissions: [] };
}
