import { sql } from "drizzle-orm";
import { index, integer, jsonb, pgEnum, pgTable, primaryKey, real, text, timestamp, uniqueIndex } from "drizzle-orm/pg-core";
import type { ExportFormatId } from "@/lib/geometry/formats";
import { users } from "./auth";
import { kits } from "./parts";
import { workspaces } from "./workspaces";

/** The unique index on (workspace_id, lower(name)): its name is how a clash is told from other failures. */
export const TEMPLATE_NAME_KEY = "templates_workspace_name_key";

/** A saved slab-and-marks recipe. The options live in versions; editing adds a version. */
export const templates = pgTable(
  "templates",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    /** null for the starter templates shipped with the product, shared by every workspace. */
    workspaceId: text("workspace_id").references(() => workspaces.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    description: text("description").notNull().default(""),
    /** Starter templates shipped with the product carry a stable key (null for a workspace's own). */
    starterKey: text("starter_key").unique(),
    currentVersion: integer("current_version").notNull().default(1),
    archivedAt: timestamp("archived_at", { withTimezone: true }),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("templates_workspace_updated_idx").on(t.workspaceId, t.updatedAt),
    /** A name names one template of a workspace, whatever its case (the service turns a clash into a Conflict on the name). */
    uniqueIndex(TEMPLATE_NAME_KEY).on(t.workspaceId, sql`lower(${t.name})`),
  ],
);

export type TemplateVariable = { name: string; label?: string; default: string; sample: string };

export const templateVersions = pgTable(
  "template_versions",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    templateId: text("template_id")
      .notNull()
      .references(() => templates.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    /** The slab builder's canonical options. */
    options: jsonb("options").$type<Record<string, unknown>>().notNull(),
    variables: jsonb("variables")
      .$type<TemplateVariable[]>()
      .notNull()
      .default(sql`'[]'::jsonb`),
    note: text("note"),
    /** What changed against the version before, in words ("text line 1: …"). */
    changes: jsonb("changes")
      .$type<string[]>()
      .notNull()
      .default(sql`'[]'::jsonb`),
    /** Top view of the slab with the sample values, drawn by a worker: pending → done | failed. */
    thumbnailState: text("thumbnail_state").$type<"pending" | "done" | "failed">().notNull().default("pending"),
    thumbnailSvg: text("thumbnail_svg"),
    /** What the checks said of the sample build. */
    findings: jsonb("findings")
      .$type<unknown[]>()
      .notNull()
      .default(sql`'[]'::jsonb`),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("template_versions_template_version_key").on(t.templateId, t.version)],
);

export const plateSourceEnum = pgEnum("plate_source", ["editor", "api", "reprint"]);
export const plateStatusEnum = pgEnum("plate_status", ["building", "ready", "failed"]);

/** One generated output for one bed: what it was made from, what the checks said, and its files. */
export const plates = pgTable(
  "plates",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    kitId: text("kit_id").references(() => kits.id, { onDelete: "set null" }),
    /** Plates keep the exact version they used, so versions are never deleted under them. */
    templateVersionId: text("template_version_id").references(() => templateVersions.id, { onDelete: "restrict" }),
    source: plateSourceEnum("source").notNull(),
    status: plateStatusEnum("status").notNull().default("building"),
    options: jsonb("options").$type<Record<string, unknown>>().notNull(),
    variables: jsonb("variables")
      .$type<Record<string, string>>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    findings: jsonb("findings")
      .$type<unknown[]>()
      .notNull()
      .default(sql`'[]'::jsonb`),
    estimates: jsonb("estimates").$type<Record<string, unknown>>(),
    stats: jsonb("stats").$type<Record<string, unknown>>(),
    pieceCount: integer("piece_count").notNull().default(0),
    /** The build job (pg-boss id) and how far it got: queued → running → done | failed. */
    jobId: text("job_id"),
    jobState: text("job_state").$type<"queued" | "running" | "done" | "failed">().notNull().default("queued"),
    progress: real("progress").notNull().default(0),
    /** Why the build failed, when it did: `{ code, message, details? }`. */
    error: jsonb("error").$type<{ code: string; message: string; details?: unknown }>(),
    /** The proof of the exported files (lib/proof): every rule, pass or fail, its figures and a one-line summary. */
    proof: jsonb("proof").$type<PlateProof>(),
    /** What the build needs: part blobs with quantities (and how to read them), kit and template references. */
    input: jsonb("input").$type<PlateInput>(),
    callbackUrl: text("callback_url"),
    title: text("title"),
    /** The order system's own reference for the plate (the API's `reference`), shown wherever the plate is named. */
    reference: text("reference"),
    /** Where the plate is on the print floor (see floor.ts); set to to_print when its files are ready. */
    floorState: text("floor_state").$type<"to_print" | "printing" | "print_failed" | "to_inspect" | "reprint_needed" | "done">(),
    /** A reprint names the plate whose missing or defective pieces it holds. */
    reprintOf: text("reprint_of"),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("plates_workspace_created_idx").on(t.workspaceId, t.createdAt),
    index("plates_kit_created_idx").on(t.kitId, t.createdAt),
    index("plates_workspace_reference_idx").on(t.workspaceId, t.reference),
    uniqueIndex("plates_job_key").on(t.jobId),
  ],
);

/**
 * A plate's files, one row per format written (lib/geometry/formats.ts): the blob that holds it, its
 * length and its SHA-256. A new export format needs no column.
 */
export const plateFiles = pgTable(
  "plate_files",
  {
    plateId: text("plate_id")
      .notNull()
      .references(() => plates.id, { onDelete: "cascade" }),
    format: text("format").$type<ExportFormatId>().notNull(),
    blobKey: text("blob_key").notNull(),
    /** Bytes; null for files stored before this table, whose length was not recorded. */
    bytes: integer("bytes"),
    sha256: text("sha256").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.plateId, t.format] }), index("plate_files_blob_idx").on(t.blobKey)],
);

export type PlateProof = {
  ok: boolean;
  failed?: string;
  rules: { rule: string; pass: boolean; figure?: number | string; message: string }[];
  figures: { bodies: number; openEdges: number; minFloor: number | null; worstSupport: number | null; qrText: string | null };
  ms: number;
  summary: string;
  timings?: Record<string, number>;
};

export type PlateInput = {
  parts: {
    name: string;
    blobKey: string;
    quantity: number;
    unit?: string;
    layFlat?: boolean;
    turned?: boolean;
    rotation?: number;
    partId?: string;
  }[];
  kitId?: string;
  templateId?: string;
};

/** Idempotency-Key of the plate API: the same key and request within 24 h answer with the same plate. */
export const idempotencyKeys = pgTable(
  "idempotency_keys",
  {
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    key: text("key").notNull(),
    requestHash: text("request_hash").notNull(),
    plateId: text("plate_id")
      .notNull()
      .references(() => plates.id, { onDelete: "cascade" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [primaryKey({ columns: [t.workspaceId, t.key] })],
);

export type Template = typeof templates.$inferSelect;
export type TemplateVersion = typeof templateVersions.$inferSelect;
export type Plate = typeof plates.$inferSelect;
