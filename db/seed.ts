/**
 * The demo workshop: an invented small shop, Marrowby Tabletop Co., selling a board-game token kit.
 * Idempotent: running it again changes nothing and keeps the same demo API key.
 */
import { promises as fs } from "node:fs";
import { parseEnv } from "@/lib/env";
import path from "node:path";
import { and, eq, isNull, sql } from "drizzle-orm";
import {
  apiKeyScopes,
  apiKeys,
  kitParts,
  kits,
  memberships,
  parts,
  templates,
  templateVersions,
  users,
  workspaceBilling,
  workspaces,
  type Role,
} from "@/db/schema";
import { templateBodySchema } from "@/lib/geometry/template";
import { demoTemplate, STARTERS } from "@/lib/templates/starters";
import { generateApiKey, hashApiKey } from "@/lib/auth/api-keys";
import { hashPassword, verifyPassword } from "@/lib/auth/password";
import { env } from "@/lib/env";
import { DEMO_PAWN_SEGMENTS, hexTile, pawn } from "@/lib/geometry/demo-shapes";
import { writeBinaryStl } from "@/lib/geometry/io/stl-write";
import { loadKernel } from "@/lib/geometry/kernel";
import { bounds, signedVolume, triangleCount, type IndexedMesh } from "@/lib/geometry/mesh";
import { orientMesh } from "@/lib/geometry/orient";
import { topViewSvg } from "@/lib/geometry/thumbnail";
import { blobStore } from "@/lib/storage";
import { createDb, createPool } from "./index";

export const DEMO_WORKSPACE = { name: "Marrowby Tabletop Co.", slug: "marrowby" };

export const DEMO_USERS: { email: string; name: string; password: string; role: Role }[] = [
  { email: "olive@marrowby.example", name: "Olive Marrow", password: "slab-demo-owner", role: "owner" },
  { email: "dario@marrowby.example", name: "Dario Fenn", password: "slab-demo-designer", role: "designer" },
  { email: "opal@marrowby.example", name: "Opal Reyes", password: "slab-demo-operator", role: "operator" },
  { email: "vic@marrowby.example", name: "Vic Hale", password: "slab-demo-viewer", role: "viewer" },
];

const DEMO_KEY_NAME = "Demo order system";

export type DemoCredentials = { users: { email: string; password: string; role: Role }[]; apiKey: string };

export function credentialsFile(): string {
  // Read afresh (not the cached env): the seed's own test points it elsewhere at run time.
  return parseEnv(process.env).SLAB_CREDENTIALS_FILE ?? path.join(process.cwd(), ".data", "demo-credentials.json");
}

async function readSavedKey(): Promise<string | null> {
  try {
    const saved = JSON.parse(await fs.readFile(credentialsFile(), "utf8")) as Partial<DemoCredentials>;
    return typeof saved.apiKey === "string" ? saved.apiKey : null;
  } catch {
    return null;
  }
}

function partRow(name: string, raw: IndexedMesh, kernel: Awaited<ReturnType<typeof loadKernel>>) {
  const mesh = orientMesh(raw);
  const b = bounds(mesh);
  const thumb = topViewSvg(kernel, mesh);
  return {
    name,
    mesh,
    thumbnailSvg: thumb.svg,
    contactArea: thumb.contactArea,
    stl: writeBinaryStl([mesh]),
    sizeX: b.max[0] - b.min[0],
    sizeY: b.max[1] - b.min[1],
    sizeZ: b.max[2] - b.min[2],
    volume: signedVolume(mesh),
    triangles: triangleCount(mesh),
  };
}

export async function seedDemo(databaseUrl = env().DATABASE_URL): Promise<DemoCredentials> {
  const kernel = await loadKernel();
  const demoParts = [partRow("Harbour tile", hexTile(), kernel), partRow("Beacon pawn", pawn(DEMO_PAWN_SEGMENTS), kernel)];
  // Bytes first: content-addressed, so a retry after a failed transaction reuses them.
  const stored = await Promise.all(demoParts.map((p) => blobStore().put(p.stl)));
  const savedKey = await readSavedKey();

  const pool = createPool(databaseUrl);
  const db = createDb(pool);
  let apiKey = savedKey ?? "";
  try {
    await db.transaction(async (tx) => {
      await tx.insert(workspaces).values(DEMO_WORKSPACE).onConflictDoNothing({ target: workspaces.slug });
      const [ws] = await tx.select().from(workspaces).where(eq(workspaces.slug, DEMO_WORKSPACE.slug));
      if (!ws) throw new Error("demo workspace missing after insert");

      const userIds: Record<Role, string> = { owner: "", designer: "", operator: "", viewer: "" };
      for (const u of DEMO_USERS) {
        const [existing] = await tx.select().from(users).where(eq(users.email, u.email));
        let id = existing?.id;
        if (!existing) {
          const [row] = await tx
            .insert(users)
            .values({ email: u.email, name: u.name, passwordHash: await hashPassword(u.password), emailVerified: new Date() })
            .returning({ id: users.id });
          id = row!.id;
        } else if (!(await verifyPassword(u.password, existing.passwordHash))) {
          // Someone changed a demo password: put the documented one back so the README stays true.
          await tx
            .update(users)
            .set({ passwordHash: await hashPassword(u.password) })
            .where(eq(users.id, existing.id));
        }
        userIds[u.role] = id!;
        await tx
          .insert(memberships)
          .values({ workspaceId: ws.id, userId: id!, role: u.role })
          .onConflictDoUpdate({
            target: [memberships.workspaceId, memberships.userId],
            set: { role: u.role },
          });
      }

      const partIds: string[] = [];
      for (const [i, p] of demoParts.entries()) {
        const blob = stored[i]!;
        const [existing] = await tx
          .select({ id: parts.id })
          .from(parts)
          .where(and(eq(parts.workspaceId, ws.id), eq(parts.name, p.name), eq(parts.uploadedBy, userIds.designer)));
        if (existing) {
          // Bring a part seeded by an earlier version up to date (mesh, thumbnail, measurements).
          await tx
            .update(parts)
            .set({
              blobKey: blob.key,
              byteSize: blob.size,
              triangles: p.triangles,
              sizeX: p.sizeX,
              sizeY: p.sizeY,
              sizeZ: p.sizeZ,
              volume: p.volume,
              thumbnailSvg: p.thumbnailSvg,
              contactArea: p.contactArea,
            })
            .where(eq(parts.id, existing.id));
          partIds.push(existing.id);
          continue;
        }
        const [row] = await tx
          .insert(parts)
          .values({
            workspaceId: ws.id,
            name: p.name,
            format: "stl",
            blobKey: blob.key,
            byteSize: blob.size,
            triangles: p.triangles,
            sizeX: p.sizeX,
            sizeY: p.sizeY,
            sizeZ: p.sizeZ,
            volume: p.volume,
            contactArea: p.contactArea,
            thumbnailSvg: p.thumbnailSvg,
            uploadedBy: userIds.designer,
          })
          .returning({ id: parts.id });
        partIds.push(row!.id);
      }

      const kitName = "Harbour Run token set";
      const [kit] = await tx
        .select()
        .from(kits)
        .where(and(eq(kits.workspaceId, ws.id), eq(kits.name, kitName)));
      if (!kit) {
        const [k] = await tx
          .insert(kits)
          .values({
            workspaceId: ws.id,
            name: kitName,
            description: "Four harbour tiles and two beacon pawns for the Harbour Run board game.",
            createdBy: userIds.designer,
          })
          .returning({ id: kits.id });
        await tx.insert(kitParts).values([
          { kitId: k!.id, partId: partIds[0]!, quantity: 4, position: 0 },
          { kitId: k!.id, partId: partIds[1]!, quantity: 2, position: 1 },
        ]);
      }

      // The demo shop is on the Workshop plan (the order API, logos), given rather than bought: no
      // subscription behind it, so its owner can try an upgrade to Farm on the local payment page.
      await tx
        .insert(workspaceBilling)
        .values({ workspaceId: ws.id, plan: "workshop", status: "active" })
        .onConflictDoUpdate({
          target: workspaceBilling.workspaceId,
          set: { plan: "workshop", status: "active", graceUntil: null },
          setWhere: isNull(workspaceBilling.subscriptionId),
        });

      // Starter templates (shared by every workspace), then the demo shop's own branded template.
      for (const st of STARTERS) {
        const [found] = await tx.select({ id: templates.id }).from(templates).where(eq(templates.starterKey, st.key));
        if (found) continue;
        const body = templateBodySchema.parse({ options: st.options, variables: st.variables });
        const [t] = await tx
          .insert(templates)
          .values({ workspaceId: null, starterKey: st.key, name: st.name, description: st.description })
          .returning({ id: templates.id });
        await tx.insert(templateVersions).values({
          templateId: t!.id,
          version: 1,
          options: body.options as Record<string, unknown>,
          variables: body.variables,
          changes: ["first version"],
          note: "shipped with Slabwright",
        });
      }
      const demo = demoTemplate();
      const [demoFound] = await tx
        .select({ id: templates.id })
        .from(templates)
        // Names are unique per workspace whatever their case (templates_workspace_name_key).
        .where(and(eq(templates.workspaceId, ws.id), sql`lower(${templates.name}) = lower(${demo.name})`));
      if (!demoFound) {
        const body = templateBodySchema.parse({ options: demo.options, variables: demo.variables });
        const [t] = await tx
          .insert(templates)
          .values({ workspaceId: ws.id, name: demo.name, description: demo.description, createdBy: userIds.designer })
          .returning({ id: templates.id });
        await tx.insert(templateVersions).values({
          templateId: t!.id,
          version: 1,
          options: body.options as Record<string, unknown>,
          variables: body.variables,
          changes: ["first version"],
          createdBy: userIds.designer,
        });
      }

      // Keep the saved demo key when this database still knows it; otherwise issue a new one.
      const known = savedKey
        ? await tx
            .select({ id: apiKeys.id })
            .from(apiKeys)
            .where(and(eq(apiKeys.workspaceId, ws.id), eq(apiKeys.keyHash, hashApiKey(savedKey))))
        : [];
      if (known.length === 0) {
        const fresh = generateApiKey();
        apiKey = fresh.key;
        await tx.insert(apiKeys).values({
          workspaceId: ws.id,
          name: DEMO_KEY_NAME,
          prefix: fresh.prefix,
          keyHash: fresh.hash,
          scopes: [...apiKeyScopes],
          createdBy: userIds.owner,
        });
      }
    });
  } finally {
    await pool.end();
  }

  const creds: DemoCredentials = { users: DEMO_USERS.map(({ email, password, role }) => ({ email, password, role })), apiKey };
  await fs.mkdir(path.dirname(credentialsFile()), { recursive: true });
  const tmp = `${credentialsFile()}.tmp`;
  await fs.writeFile(tmp, `${JSON.stringify(creds, null, 2)}\n`, { mode: 0o600 });
  await fs.rename(tmp, credentialsFile());
  return creds;
}

// Run directly (npm run db:seed, or by the start and test scripts).
if (import.meta.url === `file://${process.argv[1]}`) {
  const started = Date.now();
  seedDemo()
    .then(() => console.log(`seed: demo workshop ready (${Date.now() - started} ms)`))
    .catch((err: unknown) => {
      console.error("seed failed:", err);
      process.exitCode = 1;
    });
}
