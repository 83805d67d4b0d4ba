import { kitsUsingParts } from "@/db/queries/parts";
import type { Tx } from "@/db/queries/tx";
import type { WorkspaceActor } from "@/lib/auth/actor";

/**
 * Why a part cannot be split or deleted now: the kits of its workspace that use it, as the message
 * the library shows, or null when none does. Used by the web process and by the worker (which checks
 * again inside the transaction that replaces the part), so no server-only import here.
 */
export async function inKitsRefusal(actor: WorkspaceActor, ids: string[], verb: string, opts: { tx?: Tx } = {}): Promise<string | null> {
  const using = await kitsUsingParts(actor, ids, opts);
  if (!using.length) return null;
  const names = using.map((name) => `“${name}”`).join(", ");
  return (
    `This part is used by ${using.length === 1 ? "the kit" : "the kits"} ${names}; take it out of ` +
    `${using.length === 1 ? "that kit" : "those kits"} before you ${verb} it.`
  );
}
