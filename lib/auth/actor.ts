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

/**
 * What the few services still called with a bare workspace id take (listTemplates, versionForPlate,
 * meterPlate, and the plate map's template label): an actor, or the id, which stands for the system
 * acting for that workspace. Their queries read or count within the workspace and record no person,
 * so both give the same result; once every caller passes its actor this goes.
 */
export type ActorOrWorkspace = WorkspaceActor | string;
export function asActor(a: ActorOrWorkspace): WorkspaceActor {
  return typeof a === "string" ? systemActor(a) : a;
}
