"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { FLOOR_STATES } from "@/db/schema";
import { guardedAction } from "@/lib/auth/guards";
import { makeReprint, movePlate, recordInspection, STATE_LABEL } from "@/lib/floor/service";
import { plural } from "@/lib/plural";

const refresh = (id: string) => {
  revalidatePath("/floor");
  revalidatePath(`/floor/plates/${id}`);
};

export const movePlateAction = guardedAction(
  z.object({ id: z.string().min(1), to: z.enum(FLOOR_STATES), note: z.string().trim().max(300).optional() }),
  "inspections:record",
  "moving plates on the floor",
  async (input, caller) => {
    await movePlate(caller, input.id, input.to, input.note || undefined);
    refresh(input.id);
    return { ok: true, data: undefined, message: `Plate ${input.id.slice(0, 8)} is now ${STATE_LABEL[input.to]}.` };
  },
);

const checkSchema = z.object({
  number: z.number().int().min(1),
  state: z.enum(["present", "missing", "defective"]),
  note: z.string().trim().max(300).optional(),
});

export const inspectAction = guardedAction(
  z.object({ id: z.string().min(1), checks: z.union([z.literal("all-present"), z.array(checkSchema).max(5000)]) }),
  "inspections:record",
  "recording inspections",
  async (input, caller) => {
    const r = await recordInspection(caller, input.id, input.checks);
    refresh(input.id);
    return {
      ok: true,
      data: { state: r.to },
      message:
        r.missing || r.defective
          ? `Recorded: ${r.missing} missing, ${r.defective} defective. The maker has been told; make the reprint below when you are ready.`
          : "Recorded: every piece present. The plate is done.",
    };
  },
);

export const reprintAction = guardedAction(
  z.object({ id: z.string().min(1) }),
  "plates:reprint",
  "making reprints",
  async (input, caller) => {
    const p = await makeReprint(caller, input.id);
    refresh(input.id);
    revalidatePath("/plates");
    return { ok: true, data: { plateId: p.id }, message: `Reprint made with ${plural(p.pieceCount, "piece")}.` };
  },
);
