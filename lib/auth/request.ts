import "server-only";
import { headers } from "next/headers";
import { CLIENT_HEADER } from "@/scripts/client-address.mjs";

/**
 * The client's address for abuse limits and the audit log, as our server (scripts/serve.mjs) worked
 * it out from the socket and SLAB_TRUSTED_PROXIES; never a header the client wrote itself.
 */
export async function clientIp(from?: Headers): Promise<string> {
  const h = from ?? (await headers());
  return h.get(CLIENT_HEADER) || "unknown";
}
