import "server-only";
import { headers } from "next/headers";

/** The client's address as the nearest proxy reports it, for abuse limits and the audit log. */
export async function clientIp(from?: Headers): Promise<string> {
  const h = from ?? (await headers());
  const forwarded = h.get("x-forwarded-for")?.split(",")[0]?.trim();
  return forwarded || h.get("x-real-ip") || "local";
}
