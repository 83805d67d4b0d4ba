import { blobUses } from "@/db/queries/blobs";
import { dropPreparationsOf } from "@/db/queries/preparations";
import { blobStore } from "@/lib/storage";

/**
 * Remove blobs nothing refers to any more: no part, no plate (its files or the inputs it is made
 * from, which a remake reads again) and no upload still being checked. Used by the web process and
 * by the worker, so no server-only import here.
 */
export async function dropOrphans(keys: string[]): Promise<void> {
  for (const key of keys) {
    if ((await blobUses(key)) !== 0) continue;
    // The file's prepared readings (lib/geometry/prepared.ts) go with it.
    for (const prepared of await dropPreparationsOf(key)) if ((await blobUses(prepared)) === 0) await blobStore().delete(prepared);
    await blobStore().delete(key);
  }
}
