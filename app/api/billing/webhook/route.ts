import { apiRoute } from "@/lib/api/respond";
import { handleBillingEvent } from "@/lib/billing/service";

export const runtime = "nodejs";
export const dynamic = "force-dynamic";

/** POST /api/billing/webhook — the payment provider's signed events (verified with its SDK). */
export const POST = apiRoute(async (req: Request) => {
  const raw = await req.text();
  const outcome = await handleBillingEvent(raw, req.headers.get("stripe-signature"));
  return Response.json({ received: true, outcome });
});
