import "server-only";
import { and, asc, desc, eq, ilike, isNotNull, like, or, sql } from "drizzle-orm";
import { db } from "@/db";
import { FLOOR_STATES, floorEvents, inspections, kits, memberships, plates, users, type FloorState, type PieceCheck, type Plate } from "@/db/schema";
import type { PlanId } from "@/lib/billing/plans";
import { buildPriority, meterPlate } from "@/lib/billing/service";
import type { PlacedPiece } from "@/lib/geometry/build-plate";
import { enqueueBuild, enqueueCallback } from "@/lib/jobs/queue";
import { appUrl, sendMail } from "@/lib/mail";
import { NotFound, Conflict, Invalid } from "@/lib/errors";

/**
 * The print floor: plates move through to print → printing → to inspect → done (or print failed);
 * an inspection marks every piece present, missing or defective, and a plate with missing or
 * defective pieces waits for its reprint, which holds exactly those pieces.
 */

export type FloorActor = { workspaceId: string; userId: string | null };

export const STATE_LABEL: Record<FloorState, string> = {
  to_print: "to print",
  printing: "printing",
  print_failed: "print failed",
  to_inspect: "to inspect",
  reprint_needed: "reprint needed",
  done: "done",
};

/** Moves an operator may make by hand (inspection moves a plate to done or reprint needed). */
const MOVES: Record<FloorState, FloorState[]> = {
  to_print: ["printing"],
  printing: ["to_inspect", "print_failed"],
  print_failed: ["to_print"],
  to_inspect: ["printing"],
  reprint_needed: ["to_inspect"],
  done: ["to_inspect"],
};
export const nextMoves = (s: FloorState) => MOVES[s];

async function plateOf(workspaceId: string, id: string, lock = false, tx = db()): Promise<Plate> {
  const q = tx.select().from(plates).where(and(eq(plates.id, id), eq(plates.workspaceId, workspaceId)));
  const [p] = lock ? await q.for("update") : await q;
  if (!p) throw new NotFound("not_found", "No such plate.");
  return p;
}

export const piecesOf = (p: Plate) => ((p.stats as { pieces?: PlacedPiece[] } | null)?.pieces ?? []);

/**
 * The floor by state: how many plates are in each, and the first 50 of each — the oldest first where
 * plates wait their turn (to print, printing, to inspect, reprint needed), the newest first otherwise.
 */
export async function floorQueue(workspaceId: string, q?: string) {
  const term = q?.trim();
  const match = term ? or(like(plates.id, `${term.toLowerCase()}%`), ilike(kits.name, `%${term}%`), ilike(plates.title, `%${term}%`)) : undefined;
  const last = db()
    .selectDistinctOn([floorEvents.plateId], { plateId: floorEvents.plateId, at: floorEvents.at, by: users.name, byEmail: users.email })
    .from(floorEvents)
    .leftJoin(users, eq(users.id, floorEvents.byUserId))
    .where(eq(floorEvents.workspaceId, workspaceId))
    .orderBy(floorEvents.plateId, desc(floorEvents.at))
    .as("last");
  const counts = await db()
    .select({ state: plates.floorState, n: sql<number>`count(*)::int` })
    .from(plates)
    .leftJoin(kits, eq(kits.id, plates.kitId))
    .where(and(eq(plates.workspaceId, workspaceId), isNotNull(plates.floorState), match))
    .groupBy(plates.floorState);
  const waiting = new Set<FloorState>(["to_print", "printing", "to_inspect", "reprint_needed"]);
  const lists = await Promise.all(
    FLOOR_STATES.map(async (state) => {
      const since = sql`coalesce(${last.at}, ${plates.createdAt})`;
      const rows = await db()
        .select({ id: plates.id, floorState: plates.floorState, title: plates.title, kitName: kits.name, pieceCount: plates.pieceCount, createdAt: plates.createdAt, reprintOf: plates.reprintOf, source: plates.source, movedAt: last.at, movedBy: last.by, movedByEmail: last.byEmail })
        .from(plates)
        .leftJoin(kits, eq(kits.id, plates.kitId))
        .leftJoin(last, eq(last.plateId, plates.id))
        .where(and(eq(plates.workspaceId, workspaceId), eq(plates.floorState, state), match))
        .orderBy(waiting.has(state) ? asc(since) : desc(since))
        .limit(50);
      return [state, rows] as const;
    }),
  );
  return { counts: Object.fromEntries(counts.map((c) => [c.state!, c.n])) as Partial<Record<FloorState, number>>, lists: Object.fromEntries(lists) as Record<FloorState, (typeof lists)[number][1]> };
}

export async function plateFloor(workspaceId: string, id: string) {
  const plate = await plateOf(workspaceId, id);
  const events = await db()
    .select({ e: floorEvents, by: users.name, byEmail: users.email })
    .from(floorEvents)
    .leftJoin(users, eq(users.id, floorEvents.byUserId))
    .where(eq(floorEvents.plateId, id))
    .orderBy(desc(floorEvents.at));
  const checks = await db()
    .select({ i: inspections, by: users.name, byEmail: users.email })
    .from(inspections)
    .leftJoin(users, eq(users.id, inspections.byUserId))
    .where(eq(inspections.plateId, id))
    .orderBy(desc(inspections.at));
  const reprints = await db().select({ id: plates.id, floorState: plates.floorState, jobState: plates.jobState, pieceCount: plates.pieceCount, createdAt: plates.createdAt }).from(plates).where(and(eq(plates.workspaceId, workspaceId), eq(plates.reprintOf, id))).orderBy(asc(plates.createdAt));
  const original = plate.reprintOf ? (await db().select({ id: plates.id, floorState: plates.floorState }).from(plates).where(eq(plates.id, plate.reprintOf)))[0] ?? null : null;
  return { plate, events, inspections: checks, reprints, original };
}

export async function movePlate(actor: FloorActor, id: string, to: FloorState, note?: string) {
  await db().transaction(async (tx) => {
    const p = await plateOf(actor.workspaceId, id, true, tx);
    if (!p.floorState) throw new Conflict("not_on_floor", "This plate is not on the floor yet: its files are still being made.");
    if (!MOVES[p.floorState].includes(to)) throw new Invalid("bad_move", `A plate that is ${STATE_LABEL[p.floorState]} cannot go to ${STATE_LABEL[to]}.`);
    await tx.update(plates).set({ floorState: to }).where(eq(plates.id, id));
    await tx.insert(floorEvents).values({ workspaceId: actor.workspaceId, plateId: id, fromState: p.floorState, toState: to, note: note ?? null, byUserId: actor.userId });
  });
}

/**
 * Record an inspection: every piece of the plate present, missing or defective (with a note). The
 * plate goes to done, or to reprint needed; the maker hears of missing or defective pieces by e-mail,
 * and an API plate's callback gets a signed `inspection` event.
 */
export async function recordInspection(actor: FloorActor, id: string, checks: PieceCheck[] | "all-present") {
  const out = await db().transaction(async (tx) => {
    const p = await plateOf(actor.workspaceId, id, true, tx);
    const pieces = piecesOf(p);
    if (!p.floorState || pieces.length === 0) throw new Conflict("not_on_floor", "This plate has no finished slab to inspect yet.");
    const byNumber = new Map((checks === "all-present" ? [] : checks).map((c) => [c.number, c]));
    for (const n of byNumber.keys()) if (!pieces.some((x) => x.number === n)) throw new Invalid("invalid", `The plate has no piece ${n}.`);
    for (const c of byNumber.values()) if (c.state === "defective" && !c.note?.trim()) throw new Invalid("invalid", `Say what is wrong with piece ${c.number}.`, undefined, `note-${c.number}`);
    const results: PieceCheck[] = pieces.map((x) => byNumber.get(x.number) ?? { number: x.number, state: "present" });
    const missing = results.filter((r) => r.state === "missing").length, defective = results.filter((r) => r.state === "defective").length;
    const [prior] = await tx.select({ n: sql<number>`count(*)::int` }).from(inspections).where(eq(inspections.plateId, id));
    const [row] = await tx.insert(inspections).values({ workspaceId: actor.workspaceId, plateId: id, results, first: prior!.n === 0, missing, defective, byUserId: actor.userId }).returning();
    const to: FloorState = missing || defective ? "reprint_needed" : "done";
    await tx.update(plates).set({ floorState: to }).where(eq(plates.id, id));
    await tx.insert(floorEvents).values({ workspaceId: actor.workspaceId, plateId: id, fromState: p.floorState, toState: to, note: missing || defective ? `${missing} missing, ${defective} defective` : "all present", byUserId: actor.userId });
    return { plate: p, inspection: row!, results, missing, defective, to };
  });
  if (out.missing || out.defective) await notifyProblem(out.plate, out.results).catch((err: unknown) => console.error("[floor] notification failed", err));
  return out;
}

async function notifyProblem(p: Plate, results: PieceCheck[]) {
  const pieces = piecesOf(p);
  const bad = results.filter((r) => r.state !== "present");
  const list = bad.map((r) => `piece ${r.number} (${pieces.find((x) => x.number === r.number)?.partName ?? "?"}): ${r.state}${r.note ? ` — ${r.note}` : ""}`);
  // The plate's maker; an API plate has none, so the workspace's owners hear of it.
  const to = p.createdBy
    ? await db().select({ email: users.email }).from(users).where(eq(users.id, p.createdBy))
    : await db().select({ email: users.email }).from(memberships).innerJoin(users, eq(users.id, memberships.userId)).where(and(eq(memberships.workspaceId, p.workspaceId), eq(memberships.role, "owner")));
  // Queued first: the worker delivers it (with its retries) whatever happens to the mail.
  if (p.callbackUrl) {
    await enqueueCallback(p.workspaceId, p.callbackUrl, { event: "inspection", plate: { id: p.id, floorState: "reprint_needed" }, pieces: bad, at: new Date().toISOString() });
  }
  const url = appUrl(`/floor/plates/${p.id}`);
  for (const { email } of to) {
    await sendMail({
      to: email,
      workspaceId: p.workspaceId,
      subject: `Plate ${p.title ?? p.id.slice(0, 8)}: ${bad.length} piece${bad.length > 1 ? "s" : ""} to reprint`,
      text: `The inspection of plate ${p.title ?? ""} (${p.id.slice(0, 8)}) found:\n\n${list.map((l) => `• ${l}`).join("\n")}\n\nMake the reprint from the plate's page: ${url}\n\n— Slabwright`,
    });
  }
}

/** A new plate with only the pieces the last inspection found missing or defective, same template and values. */
export async function makeReprint(actor: FloorActor, id: string): Promise<Plate> {
  const p = await plateOf(actor.workspaceId, id);
  const [last] = await db().select().from(inspections).where(eq(inspections.plateId, id)).orderBy(desc(inspections.at)).limit(1);
  if (!last) throw new Conflict("not_inspected", "Inspect the plate first: the reprint holds the pieces the inspection found missing or defective.");
  const wanted = last.results.filter((r) => r.state !== "present").map((r) => r.number);
  if (!wanted.length) throw new Conflict("nothing_to_reprint", "The last inspection found every piece present.");
  if (!p.input) throw new Conflict("not_remakeable", "This plate has no stored inputs to reprint from.");
  const pieces = piecesOf(p);
  // Pieces name their part as the build thread does: part-1, part-2, … in the input's order.
  const byPart = p.input.parts.map((_, i) => wanted.filter((n) => pieces.find((x) => x.number === n)?.partId === `part-${i + 1}`).sort((a, b) => a - b));
  const parts = p.input.parts.map((x, i) => ({ ...x, quantity: byPart[i]!.length })).filter((x) => x.quantity > 0);
  const opts = p.options as { layout?: Record<string, unknown> };
  const { placements: _drop, pieceNumbers: _old, ...layout } = (opts.layout ?? {}) as Record<string, unknown>;
  // Each reprinted piece keeps its number from this plate (the build gives them out in kit order).
  const pieceNumbers = byPart.flat();
  let plan: PlanId = "bench";
  const [row] = await db().transaction(async (tx) => {
    plan = (await meterPlate(tx, actor.workspaceId, 1, p.options)).plan;
    return tx
    .insert(plates)
    .values({
      workspaceId: actor.workspaceId,
      kitId: p.kitId,
      templateVersionId: p.templateVersionId,
      source: "reprint",
      status: "building",
      options: { ...p.options, layout: { ...layout, copies: 1, pieceNumbers } },
      variables: p.variables,
      input: { ...p.input, parts },
      title: p.title,
      pieceCount: wanted.length,
      reprintOf: p.id,
      callbackUrl: p.callbackUrl,
      createdBy: actor.userId ?? p.createdBy,
    })
    .returning();
  });
  const jobId = await enqueueBuild(row!.id, buildPriority(plan));
  await db().update(plates).set({ jobId }).where(eq(plates.id, row!.id));
  await db().insert(floorEvents).values({ workspaceId: actor.workspaceId, plateId: p.id, fromState: p.floorState, toState: p.floorState ?? "reprint_needed", note: `reprint ${row!.id.slice(0, 8)} made (${wanted.length} piece${wanted.length > 1 ? "s" : ""})`, byUserId: actor.userId });
  return { ...row!, jobId };
}

/**
 * First-pass yield: plates whose first inspection found every piece present and none defective,
 * over plates inspected; per workspace or per kit, in all and week by week.
 */
export async function firstPassYield(workspaceId: string, kitId?: string) {
  const rows = await db()
    .select({ week: sql<string>`to_char(date_trunc('week', ${inspections.at}), 'YYYY-MM-DD')`, inspected: sql<number>`count(*)::int`, passed: sql<number>`count(*) filter (where ${inspections.missing} = 0 and ${inspections.defective} = 0)::int` })
    .from(inspections)
    .innerJoin(plates, eq(plates.id, inspections.plateId))
    .where(and(eq(inspections.workspaceId, workspaceId), eq(inspections.first, true), kitId ? eq(plates.kitId, kitId) : undefined))
    .groupBy(sql`1`)
    .orderBy(sql`1`);
  const inspected = rows.reduce((s, r) => s + r.inspected, 0), passed = rows.reduce((s, r) => s + r.passed, 0);
  return { inspected, passed, yield: inspected ? passed / inspected : null, weeks: rows };
}

export async function inspectionRows(workspaceId: string) {
  return db()
    .select({ i: inspections, title: plates.title, kitName: kits.name, by: users.name, byEmail: users.email, stats: plates.stats })
    .from(inspections)
    .innerJoin(plates, eq(plates.id, inspections.plateId))
    .leftJoin(kits, eq(kits.id, plates.kitId))
    .leftJoin(users, eq(users.id, inspections.byUserId))
    .where(eq(inspections.workspaceId, workspaceId))
    .orderBy(desc(inspections.at))
    .limit(10_000);
}

export async function kitsWithInspections(workspaceId: string) {
  return db().selectDistinct({ id: kits.id, name: kits.name }).from(inspections).innerJoin(plates, eq(plates.id, inspections.plateId)).innerJoin(kits, eq(kits.id, plates.kitId)).where(eq(inspections.workspaceId, workspaceId));
}


