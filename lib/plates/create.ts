import "server-only";
import type { Plate, PlateInput } from "@/db/schema";
import { transaction } from "@/db/queries/tx";
import { claimIdempotencyKey, failPlate, insertPlate, plateById, plateForIdempotencyKey, setPlateJob } from "@/db/queries/plates";
import type { WorkspaceActor } from "@/lib/auth/actor";
import type { PlanId } from "@/lib/billing/plans";
import { buildPriority, meterPlate } from "@/lib/billing/service";
import { Conflict } from "@/lib/errors";
import { enqueueBuild } from "@/lib/jobs/queue";

/** What a new plate is made of: everything the build thread reads, fixed when the plate is made. */
export type NewPlate = {
  kitId: string | null;
  templateVersionId: string | null;
  /** The options as stored (a template version's with the sent ones over them). */
  options: Record<string, unknown>;
  variables: Record<string, string>;
  input: PlateInput;
  title: string | null;
  /** The order system's reference (API plates; a reprint keeps its original's). */
  reference: string | null;
  pieceCount: number;
  callbackUrl: string | null;
};

export type PlateSource = "api" | "editor" | "reprint";

export type CreateHow = {
  source: PlateSource;
  /** The plate this one reprints pieces of. */
  reprintOf?: string;
  /** Who the plate is credited to when not the actor (a reprint by the worker keeps the maker). */
  createdBy?: string | null;
  /** The same key and request within 24 hours return the first plate; another request is a conflict. */
  idempotency?: { key: string; requestHash: string };
};

/**
 * The one way a plate is made (API order, slab editor, "make again", reprint): the row and its count
 * against the plan in one transaction (past the quota nothing is stored: PlanLimit), then its build
 * queued; a queue that cannot take it leaves the plate failed with `queue_unavailable`, never waiting.
 */
export async function createPlate(actor: WorkspaceActor, spec: NewPlate, how: CreateHow): Promise<{ plate: Plate; replay: boolean }> {
  const idem = how.idempotency;
  if (idem) {
    const found = await priorPlate(actor, idem.key, idem.requestHash);
    if (found) return { plate: found, replay: true };
  }
  let plan: PlanId = "bench";
  const plate = await transaction(async (tx) => {
    plan = (await meterPlate(tx, actor, 1, spec.options)).plan;
    const row = await insertPlate(tx, actor, {
      ...spec,
      source: how.source,
      status: "building",
      reprintOf: how.reprintOf ?? null,
      createdBy: how.createdBy !== undefined ? how.createdBy : actor.userId,
    });
    // another request with this key won the race
    if (idem && !(await claimIdempotencyKey(tx, actor, idem.key, idem.requestHash, row.id))) return null;
    return row;
  });
  if (!plate) {
    const again = await priorPlate(actor, idem!.key, idem!.requestHash);
    if (again) return { plate: again, replay: true };
    throw new Conflict("idempotency_conflict", "This Idempotency-Key is being used by another request.");
  }
  try {
    const jobId = await enqueueBuild(plate.id, buildPriority(plan));
    return { plate: await setPlateJob(actor, plate.id, jobId), replay: false };
  } catch (err) {
    await failPlate(actor, plate.id, { code: "queue_unavailable", message: "The build queue is not available." });
    throw err;
  }
}

async function priorPlate(actor: WorkspaceActor, key: string, requestHash: string): Promise<Plate | null> {
  const row = await plateForIdempotencyKey(actor, key);
  if (!row) return null;
  if (row.requestHash !== requestHash)
    throw new Conflict("idempotency_conflict", "This Idempotency-Key was used with a different request in the last 24 hours.");
  return row.plate;
}

/** A plate's own record as the spec of a new one (make again, reprint). */
export function specOf(p: Plate): NewPlate {
  if (!p.input) throw new Conflict("not_remakeable", "This plate has no stored inputs to make it from.");
  return {
    kitId: p.kitId,
    templateVersionId: p.templateVersionId,
    options: p.options as Record<string, unknown>,
    variables: p.variables as Record<string, string>,
    input: p.input,
    title: p.title,
    reference: p.reference,
    pieceCount: p.pieceCount,
    callbackUrl: null,
  };
}

/**
 * Make a plate again from exactly what it was made with (parts, options, values, template version):
 * the new files are byte for byte the old ones, whatever the template has become since.
 */
export async function remakePlate(actor: WorkspaceActor, plateId: string): Promise<Plate> {
  const old = await plateById(actor, plateId);
  return (await createPlate(actor, specOf(old), { source: old.source })).plate;
}
