import "server-only";
import type { Role } from "@/db/schema";
import { transaction, type Tx } from "@/db/queries/tx";
import {
  deleteMembership,
  insertMembership,
  insertWorkspace,
  lockMemberships,
  memberRows,
  setMemberRole,
  slugTaken,
} from "@/db/queries/workspaces";
import type { SessionUser } from "@/db/queries/users";
import { systemActor, type WorkspaceActor } from "@/lib/auth/actor";
import { audit } from "@/lib/audit";
import { Conflict, NotFound } from "@/lib/errors";

/** Workspaces and who is in them: a new workspace with its owner, the members, their roles. */

/** A new workspace with `userId` as its owner, inside the caller's transaction; its id. */
export async function createWorkspaceIn(tx: Tx, userId: string, name: string): Promise<string> {
  const base =
    name
      .toLowerCase()
      .replace(/[^a-z0-9]+/g, "-")
      .replace(/^-|-$/g, "")
      .slice(0, 40) || "workshop";
  let slug = base;
  for (let i = 2; ; i++) {
    if (!(await slugTaken(tx, slug))) break;
    slug = `${base}-${i}`;
  }
  const id = await insertWorkspace(tx, name, slug);
  // Nobody is a member yet: the system makes the first owner.
  await insertMembership(tx, systemActor(id), userId, "owner");
  await audit({ workspaceId: id, actorUserId: userId, action: "workspace_created", target: name }, tx);
  return id;
}

export async function createWorkspace(user: SessionUser, name: string): Promise<string> {
  return transaction((tx) => createWorkspaceIn(tx, user.id, name));
}

export async function listMembers(actor: WorkspaceActor) {
  return memberRows(actor);
}

/**
 * Change a member's role. The workspace's memberships are locked for the transaction, so two owners
 * demoting each other at once cannot leave it with none.
 */
export async function changeRole(actor: WorkspaceActor, userId: string, role: Role): Promise<void> {
  await transaction(async (tx) => {
    const rows = await lockMemberships(tx, actor);
    const target = rows.find((r) => r.user_id === userId);
    if (!target) throw new NotFound("not_found", "That person is not a member of this workspace.");
    if (target.role === role) return;
    if (target.role === "owner" && rows.filter((r) => r.role === "owner").length === 1) {
      throw new Conflict("last_owner", "This is the workspace's only owner. Make someone else an owner first.");
    }
    await setMemberRole(tx, actor, userId, role);
    await audit(
      {
        workspaceId: actor.workspaceId,
        actorUserId: actor.userId,
        action: "role_changed",
        target: userId,
        details: { from: target.role, to: role },
      },
      tx,
    );
  });
}

export async function removeMember(actor: WorkspaceActor, userId: string): Promise<void> {
  await transaction(async (tx) => {
    const rows = await lockMemberships(tx, actor);
    const target = rows.find((r) => r.user_id === userId);
    if (!target) throw new NotFound("not_found", "That person is not a member of this workspace.");
    if (target.role === "owner" && rows.filter((r) => r.role === "owner").length === 1) {
      throw new Conflict("last_owner", "This is the workspace's only owner and cannot be removed.");
    }
    await deleteMembership(tx, actor, userId);
    await audit(
      {
        workspaceId: actor.workspaceId,
        actorUserId: actor.userId,
        action: "member_removed",
        target: userId,
        details: { role: target.role },
      },
      tx,
    );
  });
}
