import "server-only";
import { and, asc, count, desc, eq, ilike, type SQL } from "drizzle-orm";
import { db } from "@/db";
import { parts, users } from "@/db/schema";
import type { Caller } from "@/lib/auth/guards";

export const PART_SORTS = { name: parts.name, triangles: parts.triangles, volume: parts.volume, contactArea: parts.contactArea, createdAt: parts.createdAt, sizeZ: parts.sizeZ } as const;
export type PartSort = keyof typeof PART_SORTS;

/** The parts library: one page of the caller's workspace's parts, searched by name and sorted. */
export async function searchParts(caller: Caller, q: { search?: string; sort?: PartSort; dir?: "asc" | "desc"; page?: number; pageSize?: number }) {
  const pageSize = Math.min(100, Math.max(1, q.pageSize ?? 20));
  const page = Math.max(1, q.page ?? 1);
  const conds: SQL[] = [eq(parts.workspaceId, caller.workspace.id)];
  if (q.search?.trim()) conds.push(ilike(parts.name, `%${q.search.trim().replace(/[%_\\]/g, (c) => `\\${c}`)}%`));
  const where = and(...conds);
  const col = PART_SORTS[q.sort ?? "createdAt"];
  const order = q.dir === "asc" ? asc(col) : desc(col);
  const [total] = await db().select({ n: count() }).from(parts).where(where);
  const rows = await db()
    .select({
      id: parts.id,
      name: parts.name,
      format: parts.format,
      triangles: parts.triangles,
      sizeX: parts.sizeX,
      sizeY: parts.sizeY,
      sizeZ: parts.sizeZ,
      volume: parts.volume,
      contactArea: parts.contactArea,
      repairs: parts.repairs,
      warnings: parts.warnings,
      unit: parts.unit,
      layFlat: parts.layFlat,
      bodies: parts.bodies,
      createdAt: parts.createdAt,
      uploadedBy: users.name,
    })
    .from(parts)
    .leftJoin(users, eq(users.id, parts.uploadedBy))
    .where(where)
    .orderBy(order, asc(parts.id))
    .limit(pageSize)
    .offset((page - 1) * pageSize);
  return { rows, total: total?.n ?? 0, page, pageSize, pages: Math.max(1, Math.ceil((total?.n ?? 0) / pageSize)) };
}
