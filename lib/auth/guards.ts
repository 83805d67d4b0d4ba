import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { cookies } from "next/headers";
import { redirect } from "next/navigation";
import { db } from "@/db";
import { memberships, users, workspaces, type Role } from "@/db/schema";
import { auth } from "./config";

export const WORKSPACE_COOKIE = "sw_workspace";

export type Caller = {
  user: { id: string; email: string; name: string | null };
  workspace: { id: string; name: string; slug: string };
  role: Role;
  workspaces: { id: string; name: string; role: Role }[];
};

/**
 * The signed-in person and their active workspace, read from the database on every call: a removed
 * member or a deleted user is refused at once, whatever the session token says.
 * Returns null when not signed in or a member of no workspace.
 */
export async function loadCaller(): Promise<Caller | null> {
  const session = await auth();
  const userId = session?.user?.id;
  if (!userId) return null;
  const [user] = await db().select().from(users).where(eq(users.id, userId)).limit(1);
  if (!user) return null;
  const rows = await db()
    .select({ id: workspaces.id, name: workspaces.name, slug: workspaces.slug, role: memberships.role })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(workspaces.name));
  if (rows.length === 0) return null;
  const wanted = (await cookies()).get(WORKSPACE_COOKIE)?.value;
  const active = rows.find((r) => r.id === wanted) ?? rows[0]!;
  return {
    user: { id: user.id, email: user.email, name: user.name },
    workspace: { id: active.id, name: active.name, slug: active.slug },
    role: active.role,
    workspaces: rows.map((r) => ({ id: r.id, name: r.name, role: r.role })),
  };
}

/** For pages: the caller, or a redirect to sign-in. */
export async function requireCaller(): Promise<Caller> {
  const caller = await loadCaller();
  if (!caller) redirect("/sign-in");
  return caller;
}

/** Membership check for one workspace by id, straight from the database. */
export async function roleIn(workspaceId: string, userId: string): Promise<Role | null> {
  const [row] = await db()
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)))
    .limit(1);
  return row?.role ?? null;
}
