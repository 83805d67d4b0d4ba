import { sql } from "drizzle-orm";
import { db } from "@/db";

/**
 * What refers to a stored blob. Blobs are content-addressed and shared: the same bytes uploaded by
 * two workspaces are one blob, so this counts the references of every workspace — a blob is dropped
 * only when none is left anywhere. Used by the web process and by the worker (no server-only import).
 */
export async function blobUses(key: string): Promise<number> {
  const [used] = await db()
    .execute<{ n: number }>(
      sql`select (select count(*) from parts where blob_key = ${key}) + (select count(*) from plate_files where blob_key = ${key}) + 
        (select count(*) from plates where input::text like ${`%${key}%`}) + (select count(*) from part_uploads where blob_key =
        ${key} and state = 'checking') + (select count(*) from part_preparations where blob_key = ${key}) as n`,
    )
    .then((r) => r.rows);
  return Number(used?.n ?? 0);
}
