import { sql } from "drizzle-orm";
import type { ImportFormatId } from "@/lib/geometry/formats";
import { boolean, check, doublePrecision, index, integer, jsonb, pgEnum, pgTable, real, text, timestamp } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { workspaces } from "./workspaces";

/** The import formats (lib/geometry/formats.ts) as stored; a new one is added here and migrated (`npm run db:generate`). */
const MESH_FORMATS = ["stl", "3mf", "obj"] as const satisfies readonly ImportFormatId[];
// Fails to compile while an import format cannot be stored.
const everyFormatStored: [Exclude<ImportFormatId, (typeof MESH_FORMATS)[number]>] extends [never] ? true : never = true;
void everyFormatStored;
export const meshFormatEnum = pgEnum("mesh_format", MESH_FORMATS);

/** An uploaded mesh: its measured metadata plus a reference to the stored bytes (SHA-256 key). */
export const parts = pgTable(
  "parts",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    format: meshFormatEnum("format").notNull(),
    blobKey: text("blob_key").notNull(),
    byteSize: integer("byte_size").notNull(),
    triangles: integer("triangles").notNull(),
    /** Bounding-box size in millimetres. */
    sizeX: real("size_x").notNull(),
    sizeY: real("size_y").notNull(),
    sizeZ: real("size_z").notNull(),
    /** mm³ */
    volume: doublePrecision("volume").notNull(),
    /** mm², the footprint one layer above the base; known once the engine has measured it. */
    contactArea: doublePrecision("contact_area"),
    repairs: jsonb("repairs")
      .$type<string[]>()
      .notNull()
      .default(sql`'[]'::jsonb`),
    /** Import warnings still standing (e.g. a size that suggests other units). */
    warnings: jsonb("warnings")
      .$type<{ code: string; message: string; suggestion?: { unit: string; scale: number } }[]>()
      .notNull()
      .default(sql`'[]'::jsonb`),
    /** Length unit the file was read in (STL and OBJ have none of their own). */
    unit: text("unit").notNull().default("millimeter"),
    /** Stand the part on its largest flat face. */
    layFlat: boolean("lay_flat").notNull().default(false),
    /** Closed shells in the file: more than one can be split into separate parts. */
    bodies: integer("bodies").notNull().default(1),
    /** Top view for the library table, drawn at upload (SVG). */
    thumbnailSvg: text("thumbnail_svg"),
    uploadedBy: text("uploaded_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    index("parts_workspace_created_idx").on(t.workspaceId, t.createdAt),
    index("parts_workspace_name_idx").on(t.workspaceId, t.name),
    check("parts_triangles_positive", sql`${t.triangles} > 0`),
  ],
);

export const partUploadStateEnum = pgEnum("part_upload_state", ["checking", "ready", "refused"]);

/**
 * One uploaded file on its way into the library. The web process only stores the bytes and this row
 * (`checking`); a worker imports the file and either adds its part(s) (`ready`, with their ids) or
 * records the importer's refusal (`refused`, with its code and message).
 */
export const partUploads = pgTable(
  "part_uploads",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    /** The file's name as sent (shown, and the part's name; never a path). */
    fileName: text("file_name").notNull(),
    blobKey: text("blob_key").notNull(),
    byteSize: integer("byte_size").notNull(),
    /**
     * How to read it: split bodies into parts, the unit, lay flat; `replaces`: a stored part read again (its new unit or lying, or split).
     */
    options: jsonb("options")
      .$type<{ split?: boolean; unit?: string; layFlat?: boolean; replaces?: string }>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    state: partUploadStateEnum("state").notNull().default("checking"),
    partIds: jsonb("part_ids")
      .$type<string[]>()
      .notNull()
      .default(sql`'[]'::jsonb`),
    error: jsonb("error").$type<{ code: string; message: string; details?: Record<string, unknown> }>(),
    uploadedBy: text("uploaded_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [index("part_uploads_workspace_created_idx").on(t.workspaceId, t.createdAt), index("part_uploads_blob_idx").on(t.blobKey)],
);

export const orientationEnum = pgEnum("piece_orientation", ["as-imported", "lay-flat", "turned"]);

/** A named set of parts with quantities. */
export const kits = pgTable(
  "kits",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    description: text("description"),
    /** The slab editor's last settings for this kit (lib/validation/kits.ts `readSlabSettings` reads them back). */
    slabSettings: jsonb("slab_settings").$type<unknown>(),
    archivedAt: timestamp("archived_at", { withTimezone: true }),
    createdBy: text("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("kits_workspace_updated_idx").on(t.workspaceId, t.updatedAt)],
);

/** One line of a kit. A part used by a kit cannot be deleted (restrict). */
export const kitParts = pgTable(
  "kit_parts",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    kitId: text("kit_id")
      .notNull()
      .references(() => kits.id, { onDelete: "cascade" }),
    partId: text("part_id")
      .notNull()
      .references(() => parts.id, { onDelete: "restrict" }),
    quantity: integer("quantity").notNull().default(1),
    /** Degrees about Z. */
    rotation: real("rotation").notNull().default(0),
    orientation: orientationEnum("orientation").notNull().default("as-imported"),
    position: integer("position").notNull().default(0),
  },
  (t) => [
    index("kit_parts_kit_idx").on(t.kitId, t.position),
    index("kit_parts_part_idx").on(t.partId),
    check("kit_parts_quantity_positive", sql`${t.quantity} > 0`),
  ],
);

/**
 * A part read and measured once for every build (lib/geometry/prepared.ts): found by `source`, the
 * SHA-256 of the engine's version, the part's own blob and the reading that shapes its mesh, and
 * kept as a blob (`blob_key`). Not a workspace's row: it is only ever found from the part's own
 * content key, which the build already holds. `part_blob_key` lets the preparations of a file go
 * with it when the file is dropped.
 */
export const partPreparations = pgTable(
  "part_preparations",
  {
    source: text("source").primaryKey(),
    partBlobKey: text("part_blob_key").notNull(),
    blobKey: text("blob_key").notNull(),
    bytes: integer("bytes").notNull(),
    /** The layer heights (mm) the blob holds measures for. */
    layerHeights: real("layer_heights").array().notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("part_preparations_part_blob_idx").on(t.partBlobKey), index("part_preparations_blob_idx").on(t.blobKey)],
);

export type Part = typeof parts.$inferSelect;
export type PartUpload = typeof partUploads.$inferSelect;
export type Kit = typeof kits.$inferSelect;
export type KitPart = typeof kitParts.$inferSelect;
