import { eq, sql } from "drizzle-orm";
import { db } from "@/db";
import { partPreparations } from "@/db/schema";

/**
 * Prepared parts (lib/geometry/prepared.ts), read and written by the build threads themselves. Not
 * a workspace's rows: each is found only by the SHA-256 of a part's own content key and its reading.
 */
export async function findPreparation(source: string): Promise<{ blobKey: string; layerHeights: number[] } | null> {
  const [row] = await db()
    .select({ blobKey: partPreparations.blobKey, layerHeights: partPreparations.layerHeights })
    .from(partPreparations)
    .where(eq(partPreparations.source, source));
  return row ?? null;
}

/** Record (or replace, when it now holds more layer heights) a part's preparation; answers the blob it replaced, if any. */
export async function savePreparation(row: {
  source: string;
  partBlobKey: string;
  blobKey: string;
  bytes: number;
  layerHeights: number[];
}): Promise<string | null> {
  return db().transaction(async (tx) => {
    const [before] = await tx
      .select({ blobKey: partPreparations.blobKey })
      .from(partPreparations)
      .where(eq(partPreparations.source, row.source))
      .for("update");
    await tx
      .insert(partPreparations)
      .values(row)
      .onConflictDoUpdate({
        target: partPreparations.source,
        set: { blobKey: row.blobKey, bytes: row.bytes, layerHeights: row.layerHeights, updatedAt: sql`now()` },
      });
    return before && before.blobKey !== row.blobKey ? before.blobKey : null;
  });
}

/** Forget the preparations of a part's file (it is being dropped); answers their blobs. */
export async function dropPreparationsOf(partBlobKey: string): Promise<string[]> {
  const rows = await db()
    .delete(partPreparations)
    .where(eq(partPreparations.partBlobKey, partBlobKey))
    .returning({ blobKey: partPreparations.blobKey });
  return rows.map((r) => r.blobKey);
}
