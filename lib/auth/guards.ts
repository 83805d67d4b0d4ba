import "server-only";
import { env } from "@/lib/env";
import { cookies } from "next/headers";
import { redirect } from "next/navigation";
import { z } from "zod";
import type { Role } from "@/db/schema";
import { sessionUserById, type SessionUser } from "@/db/queries/users";
import { roleOf, workspacesOf } from "@/db/queries/workspaces";
import type { ActionResult } from "@/lib/validation/accounts";
import { auth } from "./config";
import { isBadInputDbError } from "@/lib/db-errors";
import { forbidden, notSignedIn } from "./errors";
import { can, type Permission } from "./permissions";
import { permissionsOf, type WorkspaceActor } from "./actor";
import { AppError, formMessage } from "@/lib/errors";

export const WORKSPACE_COOKIE = "sw_workspace";

export type { SessionUser };

/** A signed-in member acting in their active workspace, with what pages show about them. */
export type Caller = WorkspaceActor & {
  userId: string;
  user: SessionUser;
  workspace: { id: string; name: string; slug: string };
  role: Role;
  workspaces: { id: string; name: string; role: Role }[];
};

/** The signed-in person, checked against the database (a deleted account is signed out at once). */
export async function loadSessionUser(): Promise<SessionUser | null> {
  const session = await auth();
  const userId = session?.user?.id;
  if (!userId) return null;
  return sessionUserById(userId);
}

/**
 * The signed-in person and their active workspace, read from the database on every call: a removed
 * member is refused at once, whatever the session token says. Null when not signed in or a member of
 * no workspace.
 */
export async function loadCaller(): Promise<Caller | null> {
  const user = await loadSessionUser();
  if (!user) return null;
  return callerFor(user, (await cookies()).get(WORKSPACE_COOKIE)?.value);
}

export async function callerFor(user: SessionUser, wantedWorkspace?: string): Promise<Caller | null> {
  const rows = await workspacesOf(user.id);
  if (rows.length === 0) return null;
  const active = rows.find((r) => r.id === wantedWorkspace) ?? rows[0]!;
  return {
    workspaceId: active.id,
    userId: user.id,
    apiKeyId: null,
    permissions: permissionsOf(active.role),
    user,
    workspace: { id: active.id, name: active.name, slug: active.slug },
    role: active.role,
    workspaces: rows.map((r) => ({ id: r.id, name: r.name, role: r.role })),
  };
}

/** For pages: the caller, or off to sign in (or to set up a first workspace). */
/** The signed-in member, or off to sign in (and back to `next`, a path of ours, afterwards). */
export async function requireCaller(next?: string): Promise<Caller> {
  const user = await loadSessionUser();
  if (!user) redirect(next ? `/sign-in?next=${encodeURIComponent(next)}` : "/sign-in");
  const caller = await callerFor(user, (await cookies()).get(WORKSPACE_COOKIE)?.value);
  if (!caller) redirect("/welcome");
  return caller;
}

/** For pages that need a permission: the caller, or null with the reason to show. */
export async function requirePermission(permission: Permission): Promise<{ caller: Caller; allowed: boolean }> {
  const caller = await requireCaller();
  return { caller, allowed: can(caller.role, permission) };
}

/** For code paths that throw: the caller allowed to do `permission`, or an AppError (Unauthorized, Forbidden). */
export async function authorize(permission: Permission, what: string): Promise<Caller> {
  const caller = await loadCaller();
  if (!caller) throw notSignedIn();
  if (!can(caller.role, permission)) throw forbidden(what);
  return caller;
}

/** Make a workspace the active one for this browser (the membership is still checked on every request). */
export async function setActiveWorkspace(workspaceId: string): Promise<void> {
  (await cookies()).set(WORKSPACE_COOKIE, workspaceId, {
    httpOnly: true,
    sameSite: "lax",
    path: "/",
    secure: env().AUTH_URL.startsWith("https://"),
  });
}

/** Membership check for one workspace by id, straight from the database. */
export async function roleIn(workspaceId: string, userId: string): Promise<Role | null> {
  return roleOf(workspaceId, userId);
}

/**
 * Server actions: validate the input with the shared schema, then load the caller and check the
 * permission, then act. Field errors come back per field; access problems and unexpected failures
 * come back as a message (unexpected ones are logged with their cause, never shown verbatim).
 */
export function guardedAction<S extends z.ZodType, R>(
  schema: S,
  permission: Permission | null,
  what: string,
  fn: (input: z.output<S>, caller: Caller) => Promise<ActionResult<R>>,
) {
  return async (input: z.input<S>): Promise<ActionResult<R>> => {
    const parsed = schema.safeParse(input);
    if (!parsed.success) {
      return {
        ok: false,
        message: "Check the marked fields.",
        fieldErrors: z.flattenError(parsed.error).fieldErrors as Record<string, string[]>,
      };
    }
    const caller = await loadCaller();
    if (!caller) return { ok: false, code: "unauthorized", message: "Your session has ended; sign in again." };
    if (permission && !can(caller.role, permission)) return { ok: false, code: "forbidden", message: forbidden(what).message };
    try {
      return await fn(parsed.data, caller);
    } catch (err) {
      if (err instanceof AppError)
        return {
          ok: false,
          code: err.code,
          message: formMessage(err),
          fieldErrors: err.field ? { [err.field]: [formMessage(err)] } : undefined,
        };
      if (isBadInputDbError(err))
        return {
          ok: false,
          code: "bad_request",
          message: "Something you entered cannot be stored (a NUL character, or a number or text out of range). Nothing was changed.",
        };
      console.error(`[action] ${what} failed`, err);
      return { ok: false, code: "internal", message: "Something went wrong and nothing was changed. Try again." };
    }
  };
}
