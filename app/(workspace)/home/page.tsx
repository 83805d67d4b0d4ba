import { redirect } from "next/navigation";
import { requireCaller } from "@/lib/auth/guards";
import { LANDING } from "@/lib/auth/landing";

/** After signing in, switching workspace or joining one: on to where the caller's role works. */
export default async function HomePage() {
  const caller = await requireCaller();
  redirect(LANDING[caller.role]);
}
