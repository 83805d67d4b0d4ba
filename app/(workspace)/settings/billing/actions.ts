"use server";

import { z } from "zod";
import { guardedAction } from "@/lib/auth/guards";
import { billingPortal, startCheckout } from "@/lib/billing/service";

export const checkoutAction = guardedAction(
  z.object({ plan: z.enum(["workshop", "farm"]) }),
  "billing:manage",
  "changing the plan",
  async (input, caller) => {
    const url = await startCheckout({ ...caller, email: caller.user.email }, input.plan);
    return { ok: true, data: { url } };
  },
);

export const portalAction = guardedAction(z.object({}), "billing:manage", "managing billing", async (_input, caller) => {
  return { ok: true, data: { url: await billingPortal(caller) } };
});
