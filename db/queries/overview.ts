import "server-only";
import { and, eq, isNotNull, isNull, sql } from "drizzle-orm";
import { db } from "@/db";
import { invitations, kits, memberships, plates, templates } from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";

/** The counts on the workspace overview, each kept to the actor's workspace. */
export async function overviewCounts(actor: WorkspaceActor) {
  const ws = actor.workspaceId;
  const n = sql<number>`count(*)::int`;
  const [floor, kitRows, templateRows, people, invited] = await Promise.all([
    db()
      .select({ state: plates.floorState, n })
      .from(plates)
      .where(and(eq(plates.workspaceId, ws), isNotNull(plates.floorState)))
      .groupBy(plates.floorState),
    db()
      .select({ n })
      .from(kits)
      .where(and(eq(kits.workspaceId, ws), isNull(kits.archivedAt))),
    db()
      .select({ n })
      .from(templates)
      .where(and(eq(templates.workspaceId, ws), isNull(templates.archivedAt))),
    db().select({ n }).from(memberships).where(eq(memberships.workspaceId, ws)),
    db()
      .select({ n })
      .from(invitations)
      .where(
        and(
          eq(invitations.workspaceId, ws),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
          sql`${invitations.expiresAt} > now()`,
        ),
      ),
  ]);
  const byState = Object.fromEntries(floor.map((r) => [r.state!, r.n])) as Partial<
    Record<NonNullable<(typeof floor)[number]["state"]>, number>
  >;
  return {
    floor: byState,
    kits: kitRows[0]?.n ?? 0,
    templates: templateRows[0]?.n ?? 0,
    people: people[0]?.n ?? 0,
    invited: invited[0]?.n ?? 0,
  };
}
