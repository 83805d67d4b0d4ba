import "server-only";
import { and, asc, desc, eq, ilike, inArray, isNotNull, like, or, sql } from "drizzle-orm";
import { db } from "@/db";
import {
  FLOOR_STATES,
  floorEvents,
  inspections,
  kits,
  memberships,
  plates,
  templates,
  templateVersions,
  users,
  type FloorState,
  type PieceCheck,
  type Plate,
} from "@/db/schema";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { Tx } from "./tx";

/** The print floor's reads and writes (plates' floor state, floor events, inspections), within the actor's workspace. */

const WAITING = new Set<FloorState>(["to_print", "printing", "to_inspect", "reprint_needed"]);

/** Plates per page in each state's list. */
export const FLOOR_PAGE = 50;

/** How a state's list is sorted: the longest waiting first (the newest first for done), the newest first, or by order reference. */
export const FLOOR_SORTS = ["waiting", "newest", "reference"] as const;
export type FloorSort = (typeof FLOOR_SORTS)[number];

export type FloorFilter = {
  /** The start of a plate's id, or text in its order reference, kit or title. */
  term?: string;
  kitId?: string;
  templateId?: string;
  sort?: FloorSort;
  /** The page (from 1) of each state's list. */
  pages?: Partial<Record<FloorState, number>>;
};

/**
 * The floor by state: how many plates are in each, and one page of each (FLOOR_PAGE plates), sorted as
 * asked; filtered by a search term, a kit or a template (any of its versions), all in the query.
 */
export async function floorQueue(actor: WorkspaceActor, filter: FloorFilter = {}) {
  const ws = actor.workspaceId;
  const { term, kitId, templateId, sort = "waiting", pages = {} } = filter;
  const match = and(
    term
      ? or(
          like(plates.id, `${term.toLowerCase()}%`),
          ilike(plates.reference, `%${term}%`),
          ilike(kits.name, `%${term}%`),
          ilike(plates.title, `%${term}%`),
        )
      : undefined,
    kitId ? eq(plates.kitId, kitId) : undefined,
    templateId
      ? inArray(
          plates.templateVersionId,
          db().select({ id: templateVersions.id }).from(templateVersions).where(eq(templateVersions.templateId, templateId)),
        )
      : undefined,
  );
  const last = db()
    .selectDistinctOn([floorEvents.plateId], { plateId: floorEvents.plateId, at: floorEvents.at, by: users.name, byEmail: users.email })
    .from(floorEvents)
    .leftJoin(users, eq(users.id, floorEvents.byUserId))
    .where(eq(floorEvents.workspaceId, ws))
    .orderBy(floorEvents.plateId, desc(floorEvents.at))
    .as("last");
  const counts = await db()
    .select({ state: plates.floorState, n: sql<number>`count(*)::int` })
    .from(plates)
    .leftJoin(kits, eq(kits.id, plates.kitId))
    .where(and(eq(plates.workspaceId, ws), isNotNull(plates.floorState), match))
    .groupBy(plates.floorState);
  const byState = Object.fromEntries(counts.map((c) => [c.state!, c.n])) as Partial<Record<FloorState, number>>;
  const lists = await Promise.all(
    FLOOR_STATES.map(async (state) => {
      const total = byState[state] ?? 0;
      // A page past the end shows the last one.
      const page = Math.min(Math.max(1, Math.floor(pages[state] ?? 1)), Math.max(1, Math.ceil(total / FLOOR_PAGE)));
      if (!total) return [state, { page, rows: [] }] as const;
      const since = sql`coalesce(${last.at}, ${plates.createdAt})`;
      const order =
        sort === "reference"
          ? [sql`${plates.reference} asc nulls last`, desc(plates.createdAt), asc(plates.id)]
          : sort === "newest"
            ? [desc(plates.createdAt), asc(plates.id)]
            : [WAITING.has(state) ? asc(since) : desc(since), asc(plates.id)];
      const rows = await db()
        .select({
          id: plates.id,
          floorState: plates.floorState,
          title: plates.title,
          reference: plates.reference,
          kitName: kits.name,
          pieceCount: plates.pieceCount,
          createdAt: plates.createdAt,
          reprintOf: plates.reprintOf,
          source: plates.source,
          movedAt: last.at,
          movedBy: last.by,
          movedByEmail: last.byEmail,
        })
        .from(plates)
        .leftJoin(kits, eq(kits.id, plates.kitId))
        .leftJoin(last, eq(last.plateId, plates.id))
        .where(and(eq(plates.workspaceId, ws), eq(plates.floorState, state), match))
        .orderBy(...order)
        .limit(FLOOR_PAGE)
        .offset((page - 1) * FLOOR_PAGE);
      return [state, { page, rows }] as const;
    }),
  );
  return {
    counts: byState,
    lists: Object.fromEntries(lists) as Record<FloorState, (typeof lists)[number][1]>,
  };
}

/** The kits and templates that plates on the floor were made with, for the floor's filters. */
export async function floorFilterChoices(actor: WorkspaceActor) {
  const ws = actor.workspaceId;
  const [kitRows, templateRows] = await Promise.all([
    db()
      .selectDistinct({ id: kits.id, name: kits.name })
      .from(plates)
      .innerJoin(kits, eq(kits.id, plates.kitId))
      .where(and(eq(plates.workspaceId, ws), isNotNull(plates.floorState)))
      .orderBy(asc(kits.name)),
    db()
      .selectDistinct({ id: templates.id, name: templates.name })
      .from(plates)
      .innerJoin(templateVersions, eq(templateVersions.id, plates.templateVersionId))
      .innerJoin(templates, eq(templates.id, templateVersions.templateId))
      .where(and(eq(plates.workspaceId, ws), isNotNull(plates.floorState)))
      .orderBy(asc(templates.name)),
  ]);
  return { kits: kitRows, templates: templateRows };
}

/** A plate's floor history: its moves and inspections (newest first), its reprints, and the plate it reprints. */
export async function floorHistory(actor: WorkspaceActor, plate: Plate) {
  const ws = actor.workspaceId;
  const events = await db()
    .select({ e: floorEvents, by: users.name, byEmail: users.email })
    .from(floorEvents)
    .leftJoin(users, eq(users.id, floorEvents.byUserId))
    .where(and(eq(floorEvents.plateId, plate.id), eq(floorEvents.workspaceId, ws)))
    .orderBy(desc(floorEvents.at));
  const checks = await db()
    .select({ i: inspections, by: users.name, byEmail: users.email })
    .from(inspections)
    .leftJoin(users, eq(users.id, inspections.byUserId))
    .where(and(eq(inspections.plateId, plate.id), eq(inspections.workspaceId, ws)))
    .orderBy(desc(inspections.at));
  const reprints = await db()
    .select({
      id: plates.id,
      floorState: plates.floorState,
      jobState: plates.jobState,
      pieceCount: plates.pieceCount,
      createdAt: plates.createdAt,
    })
    .from(plates)
    .where(and(eq(plates.workspaceId, ws), eq(plates.reprintOf, plate.id)))
    .orderBy(asc(plates.createdAt));
  const original = plate.reprintOf
    ? ((
        await db()
          .select({ id: plates.id, floorState: plates.floorState })
          .from(plates)
          .where(and(eq(plates.id, plate.reprintOf), eq(plates.workspaceId, ws)))
      )[0] ?? null)
    : null;
  return { events, inspections: checks, reprints, original };
}

/** Move a plate on the floor and record who moved it, inside the caller's transaction. */
export async function setFloorState(
  tx: Tx,
  actor: WorkspaceActor,
  plateId: string,
  from: FloorState | null,
  to: FloorState,
  note: string | null,
): Promise<void> {
  await tx
    .update(plates)
    .set({ floorState: to })
    .where(and(eq(plates.id, plateId), eq(plates.workspaceId, actor.workspaceId)));
  await addFloorEvent(tx, actor, plateId, from, to, note);
}

/** A line in a plate's floor history without a move (a reprint made). */
export async function addFloorEvent(
  tx: Tx,
  actor: WorkspaceActor,
  plateId: string,
  from: FloorState | null,
  to: FloorState,
  note: string | null,
): Promise<void> {
  await tx
    .insert(floorEvents)
    .values({ workspaceId: actor.workspaceId, plateId, fromState: from, toState: to, note, byUserId: actor.userId });
}

/** Store an inspection; the first of a plate counts towards first-pass yield. */
export async function insertInspection(
  tx: Tx,
  actor: WorkspaceActor,
  plateId: string,
  results: PieceCheck[],
  missing: number,
  defective: number,
) {
  const [prior] = await tx
    .select({ n: sql<number>`count(*)::int` })
    .from(inspections)
    .where(and(eq(inspections.plateId, plateId), eq(inspections.workspaceId, actor.workspaceId)));
  const [row] = await tx
    .insert(inspections)
    .values({ workspaceId: actor.workspaceId, plateId, results, first: prior!.n === 0, missing, defective, byUserId: actor.userId })
    .returning();
  return row!;
}

/** The newest inspection of a plate, if any. */
export async function lastInspection(actor: WorkspaceActor, plateId: string) {
  const [last] = await db()
    .select()
    .from(inspections)
    .where(and(eq(inspections.plateId, plateId), eq(inspections.workspaceId, actor.workspaceId)))
    .orderBy(desc(inspections.at))
    .limit(1);
  return last ?? null;
}

/** Who hears of a plate's missing pieces: its maker, or (an API plate has none) the workspace's owners. */
export async function problemRecipients(p: Plate): Promise<string[]> {
  // A maker who has left the workspace hears nothing more of it; its owners do instead.
  const maker = p.createdBy
    ? await db()
        .select({ email: users.email })
        .from(users)
        .innerJoin(memberships, and(eq(memberships.userId, users.id), eq(memberships.workspaceId, p.workspaceId)))
        .where(eq(users.id, p.createdBy))
    : [];
  const rows = maker.length
    ? maker
    : await db()
        .select({ email: users.email })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(and(eq(memberships.workspaceId, p.workspaceId), eq(memberships.role, "owner")));
  return rows.map((r) => r.email);
}

/** First inspections by ISO week: how many, and how many found every piece present and none defective. */
export async function firstInspectionsByWeek(actor: WorkspaceActor, kitId?: string) {
  return db()
    .select({
      week: sql<string>`to_char(date_trunc('week', ${inspections.at}), 'YYYY-MM-DD')`,
      inspected: sql<number>`count(*)::int`,
      passed: sql<number>`count(*) filter (where ${inspections.missing} = 0 and ${inspections.defective} = 0)::int`,
    })
    .from(inspections)
    .innerJoin(plates, eq(plates.id, inspections.plateId))
    .where(and(eq(inspections.workspaceId, actor.workspaceId), eq(inspections.first, true), kitId ? eq(plates.kitId, kitId) : undefined))
    .groupBy(sql`1`)
    .orderBy(sql`1`);
}

/** Every inspection (newest first, at most 10 000) with its plate, kit and inspector, for the CSV export. */
export async function inspectionRows(actor: WorkspaceActor) {
  return db()
    .select({ i: inspections, title: plates.title, kitName: kits.name, by: users.name, byEmail: users.email, stats: plates.stats })
    .from(inspections)
    .innerJoin(plates, eq(plates.id, inspections.plateId))
    .leftJoin(kits, eq(kits.id, plates.kitId))
    .leftJoin(users, eq(users.id, inspections.byUserId))
    .where(eq(inspections.workspaceId, actor.workspaceId))
    .orderBy(desc(inspections.at))
    .limit(10_000);
}

/** Kits with at least one inspected plate. */
export async function kitsWithInspections(actor: WorkspaceActor) {
  return db()
    .selectDistinct({ id: kits.id, name: kits.name })
    .from(inspections)
    .innerJoin(plates, eq(plates.id, inspections.plateId))
    .innerJoin(kits, eq(kits.id, plates.kitId))
    .where(eq(inspections.workspaceId, actor.workspaceId));
}
