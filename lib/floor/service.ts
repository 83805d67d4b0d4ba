import "server-only";
import { transaction } from "@/db/queries/tx";
import { type FloorState, type PieceCheck, type Plate } from "@/db/schema";
import {
  addFloorEvent,
  firstInspectionsByWeek,
  floorHistory,
  floorQueue as queueRows,
  type FloorFilter,
  insertInspection,
  lastInspection,
  problemRecipients,
  setFloorState,
} from "@/db/queries/floor";
import { plateById } from "@/db/queries/plates";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { PlacedPiece } from "@/lib/geometry/build-plate";
import { enqueueCallback } from "@/lib/jobs/queue";
import { appUrl, sendMail } from "@/lib/mail";
import { createPlate, specOf } from "@/lib/plates/create";
import { Conflict, Invalid } from "@/lib/errors";
import { plateName } from "@/lib/plates/name";
import { plural } from "@/lib/plural";

/**
 * The print floor: plates move through to print → printing → to inspect → done (or print failed);
 * an inspection marks every piece present, missing or defective, and a plate with missing or
 * defective pieces waits for its reprint, which holds exactly those pieces.
 */

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

export const piecesOf = (p: Plate) => (p.stats as { pieces?: PlacedPiece[] } | null)?.pieces ?? [];

/** The floor by state (counts, and one page of each); `term` finds a plate by id, order reference, kit or title. */
export async function floorQueue(actor: WorkspaceActor, filter: FloorFilter = {}) {
  return queueRows(actor, { ...filter, term: filter.term?.trim() || undefined });
}

export async function plateFloor(actor: WorkspaceActor, id: string) {
  const plate = await plateById(actor, id);
  return { plate, ...(await floorHistory(actor, plate)) };
}

export async function movePlate(actor: WorkspaceActor, id: string, to: FloorState, note?: string) {
  await transaction(async (tx) => {
    const p = await plateById(actor, id, { tx, lock: true });
    if (!p.floorState) throw new Conflict("not_on_floor", "This plate is not on the floor yet: its files are still being made.");
    if (!MOVES[p.floorState].includes(to))
      throw new Invalid("bad_move", `A plate that is ${STATE_LABEL[p.floorState]} cannot go to ${STATE_LABEL[to]}.`);
    await setFloorState(tx, actor, id, p.floorState, to, note ?? null);
  });
}

/**
 * Record an inspection: every piece of the plate present, missing or defective (with a note). The
 * plate goes to done, or to reprint needed; the maker hears of missing or defective pieces by e-mail,
 * and an API plate's callback gets a signed `inspection` event.
 */
export async function recordInspection(actor: WorkspaceActor, id: string, checks: PieceCheck[] | "all-present") {
  const out = await transaction(async (tx) => {
    const p = await plateById(actor, id, { tx, lock: true });
    const pieces = piecesOf(p);
    if (!p.floorState || pieces.length === 0) throw new Conflict("not_on_floor", "This plate has no finished slab to inspect yet.");
    const byNumber = new Map((checks === "all-present" ? [] : checks).map((c) => [c.number, c]));
    for (const n of byNumber.keys()) if (!pieces.some((x) => x.number === n)) throw new Invalid("invalid", `The plate has no piece ${n}.`);
    for (const c of byNumber.values())
      if (c.state === "defective" && !c.note?.trim())
        throw new Invalid("invalid", `Say what is wrong with piece ${c.number}.`, undefined, `note-${c.number}`);
    const results: PieceCheck[] = pieces.map((x) => byNumber.get(x.number) ?? { number: x.number, state: "present" });
    const missing = results.filter((r) => r.state === "missing").length,
      defective = results.filter((r) => r.state === "defective").length;
    const row = await insertInspection(tx, actor, id, results, missing, defective);
    const to: FloorState = missing || defective ? "reprint_needed" : "done";
    await setFloorState(
      tx,
      actor,
      id,
      p.floorState,
      to,
      missing || defective ? `${missing} missing, ${defective} defective` : "all present",
    );
    return { plate: p, inspection: row, results, missing, defective, to };
  });
  if (out.missing || out.defective)
    await notifyProblem(out.plate, out.results).catch((err: unknown) => console.error("[floor] notification failed", err));
  return out;
}

async function notifyProblem(p: Plate, results: PieceCheck[]) {
  const pieces = piecesOf(p);
  const bad = results.filter((r) => r.state !== "present");
  const list = bad.map(
    (r) => `piece ${r.number} (${pieces.find((x) => x.number === r.number)?.partName ?? "?"}): ${r.state}${r.note ? ` — ${r.note}` : ""}`,
  );
  // The plate's maker; an API plate has none, so the workspace's owners hear of it.
  const to = await problemRecipients(p);
  // Queued first: the worker delivers it (with its retries) whatever happens to the mail.
  if (p.callbackUrl) {
    await enqueueCallback(p.workspaceId, p.callbackUrl, {
      event: "inspection",
      plate: { id: p.id, floorState: "reprint_needed" },
      pieces: bad,
      at: new Date().toISOString(),
    });
  }
  const url = appUrl(`/floor/plates/${p.id}`);
  for (const email of to) {
    await sendMail({
      to: email,
      workspaceId: p.workspaceId,
      subject: `Plate ${plateName(p)}: ${plural(bad.length, "piece")} to reprint`,
      text:
        `The inspection of plate ${plateName(p)} (${p.id.slice(0, 8)}) ` +
        `found:\n\n${list.map((l) => `• ${l}`).join("\n")}\n\nMake the reprint from the plate's page: ${url}\n\n— Slabwright`,
    });
  }
}

/** A new plate with only the pieces the last inspection found missing or defective, same template and values. */
export async function makeReprint(actor: WorkspaceActor, id: string): Promise<Plate> {
  const p = await plateById(actor, id);
  const last = await lastInspection(actor, id);
  if (!last)
    throw new Conflict("not_inspected", "Inspect the plate first: the reprint holds the pieces the inspection found missing or defective.");
  const wanted = last.results.filter((r) => r.state !== "present").map((r) => r.number);
  if (!wanted.length) throw new Conflict("nothing_to_reprint", "The last inspection found every piece present.");
  if (!p.input) throw new Conflict("not_remakeable", "This plate has no stored inputs to reprint from.");
  const pieces = piecesOf(p);
  // Pieces name their part as the build thread does: part-1, part-2, … in the input's order.
  const byPart = p.input.parts.map((_, i) =>
    wanted.filter((n) => pieces.find((x) => x.number === n)?.partId === `part-${i + 1}`).sort((a, b) => a - b),
  );
  const parts = p.input.parts.map((x, i) => ({ ...x, quantity: byPart[i]!.length })).filter((x) => x.quantity > 0);
  const opts = p.options as { layout?: Record<string, unknown> };
  const { placements: _drop, pieceNumbers: _old, ...layout } = (opts.layout ?? {}) as Record<string, unknown>;
  // Each reprinted piece keeps its number from this plate (the build gives them out in kit order).
  const pieceNumbers = byPart.flat();
  const { plate: row } = await createPlate(
    actor,
    {
      ...specOf(p),
      options: { ...p.options, layout: { ...layout, copies: 1, pieceNumbers } },
      input: { ...p.input, parts },
      pieceCount: wanted.length,
      callbackUrl: p.callbackUrl,
    },
    { source: "reprint", reprintOf: p.id, createdBy: actor.userId ?? p.createdBy },
  );
  await transaction((tx) =>
    addFloorEvent(
      tx,
      actor,
      p.id,
      p.floorState,
      p.floorState ?? "reprint_needed",
      `reprint ${row.id.slice(0, 8)} made (${plural(wanted.length, "piece")})`,
    ),
  );
  return row;
}

/**
 * First-pass yield: plates whose first inspection found every piece present and none defective,
 * over plates inspected; per workspace or per kit, in all and week by week.
 */
export async function firstPassYield(actor: WorkspaceActor, kitId?: string) {
  const rows = await firstInspectionsByWeek(actor, kitId);
  const inspected = rows.reduce((s, r) => s + r.inspected, 0),
    passed = rows.reduce((s, r) => s + r.passed, 0);
  return { inspected, passed, yield: inspected ? passed / inspected : null, weeks: rows };
}

export { FLOOR_PAGE, FLOOR_SORTS, floorFilterChoices, inspectionRows, kitsWithInspections, type FloorSort } from "@/db/queries/floor";
