import type { Piscina } from "piscina";
import { runOnPool } from "./pool-run";
import type { ExportFormatId } from "@/lib/geometry/formats";
import type { plates, Plate } from "@/db/schema";
import { announcePlate, finishBuild, plateForBuild, setBuildProgress, startBuild } from "@/db/queries/builds";
import { systemActor } from "@/lib/auth/actor";
import { blobStore } from "@/lib/storage";
import type { BuildOutcome, BuildTask } from "./build-thread";
import { enqueueCallback, PLATE_CHANNEL } from "./queue";
import { plateName } from "@/lib/plates/name";

const errorFindings = (findings: unknown[]) => (findings as { severity: string }[]).filter((f) => f.severity === "error");

/**
 * Run one plate's build: read its inputs, build in a pool thread, store both files, record the
 * outcome on the plate, then queue its webhook (delivered from its own queue, so a slow receiver never
 * holds a build slot). A bad input (a mesh that does not import, options that
 * cannot fit) fails the plate for good; anything unexpected is thrown so the queue retries the job.
 */
export async function runPlateJob(pool: Piscina, plateId: string, jobId: string): Promise<void> {
  const plate = await plateForBuild(plateId);
  if (!plate || !plate.input) throw new Error(`plate ${plateId} has no input`);
  if (plate.jobState === "done" || plate.jobState === "failed") return; // finished by an earlier delivery of this job
  const actor = systemActor(plate.workspaceId);
  await startBuild(actor, plateId, jobId);
  const task: BuildTask = {
    // The thread reads a part's blob only when it does not hold that part already.
    parts: plate.input.parts,
    options: plate.options,
    variables: plate.variables,
    // The 3MF's Title: the plate as people name it, the order reference first.
    title: plateName(plate),
  };
  const outcome = await runOnPool<BuildOutcome>(pool, task);
  if (!outcome.ok) {
    await finish(plate, {
      jobState: "failed",
      status: "failed",
      error: { code: outcome.code, message: outcome.message, details: outcome.details },
    });
    return;
  }
  const r = outcome.result;
  if (errorFindings(r.findings).length || !(outcome.files?.length || (r.stl && r.threeMf))) {
    await finish(plate, {
      jobState: "failed",
      status: "failed",
      findings: r.findings,
      error: { code: "findings", message: "The plate has findings of severity error.", details: errorFindings(r.findings) },
    });
    return;
  }
  // Every stored plate carries its proof; a plate whose files fail it is never ready.
  const proof = outcome.proof;
  if (!proof) {
    await finish(plate, {
      jobState: "failed",
      status: "failed",
      findings: r.findings,
      error: { code: "proof_failed", message: "The plate's files were not proven (no proof came back from the build)." },
    });
    return;
  }
  if (!proof.ok) {
    const failed = proof.rules.find((x) => !x.pass);
    await finish(plate, {
      jobState: "failed",
      status: "failed",
      findings: r.findings,
      proof,
      error: {
        code: "proof_failed",
        message: `The plate's files failed their proof (${failed?.rule ?? proof.failed}): ${failed?.message ?? proof.summary}`,
        details: { rule: proof.failed, figure: failed?.figure ?? null, summary: proof.summary },
      },
    });
    return;
  }
  await setBuildProgress(actor, plateId, 0.9);
  // The build thread stored the files itself and sent their keys; files sent back whole (none today) are stored here.
  const written: [ExportFormatId, Uint8Array][] = outcome.files
    ? []
    : [
        ["stl", r.stl!],
        ["3mf", r.threeMf!],
      ];
  const files =
    outcome.files ??
    (await Promise.all(
      written.map(async ([format, bytes]) => ({ format, key: (await blobStore().put(bytes)).key, bytes: bytes.byteLength })),
    ));
  await finish(
    plate,
    {
      jobState: "done",
      status: "ready",
      floorState: "to_print",
      findings: r.findings,
      estimates: r.estimates as unknown as Record<string, unknown>,
      stats: { ...r.stats, layout: r.layout, pieces: r.pieces } as unknown as Record<string, unknown>,
      pieceCount: r.pieces.length,
      proof,
    },
    files.map((f) => ({ format: f.format, blobKey: f.key, bytes: f.bytes, sha256: f.key })),
  );
}

async function finish(plate: Plate, set: Partial<typeof plates.$inferInsert>, files?: Parameters<typeof finishBuild>[4]) {
  const finishedAt = new Date();
  await finishBuild(systemActor(plate.workspaceId), plate.id, set, finishedAt, files);
  await announcePlate(PLATE_CHANNEL, plate.id);
  if (plate.callbackUrl) {
    const event = {
      event: set.jobState === "done" ? "plate.done" : "plate.failed",
      plate: { id: plate.id, status: set.status, error: set.error ?? null },
      job: { id: plate.jobId, status: set.jobState },
      at: finishedAt.toISOString(),
    };
    // The plate is stored and final: a queue hiccup loses the event (logged), not the build.
    await enqueueCallback(plate.workspaceId, plate.callbackUrl, event).catch((err: unknown) =>
      console.error(`[worker] callback for plate ${plate.id} not queued`, err),
    );
  }
}
