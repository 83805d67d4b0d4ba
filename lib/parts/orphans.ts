import { sql } from "drizzle-orm";
import { db } from "@/db";
import { blobStore } from "@/lib/storage";

/**
 * Remove blobs nothing refers to any more: no part, no plate (its files or the inputs it is made
 * from, which a remake reads again) and no upload still being checked. Used by the web process and
 * by the worker, so no server-only import here.
 */
export async function dropOrphans(keys: string[]): Promise<void> {
  for (const key of keys) {
    const [used] = await db()
      .execute<{ n: number }>(
        sql`select (select count(*) from parts where blob_key = ${key}) + (select count(*) from plates where stl_blob_key = ${key} or three_mf_blob_key = ${key} or input::text like ${`%${key}%`}) + (select count(*) from part_uploads where blob_key = ${key} and state = 'checking') as n`,
      )
      .then((r) => r.rows);
    if (Number(used?.n ?? 0) === 0) await blobStore().delete(key);
  }
}
