import { boolean, index, integer, jsonb, pgTable, text, timestamp } from "drizzle-orm/pg-core";
import { users } from "./auth";
import { plates } from "./plates";
import { workspaces } from "./workspaces";

/**
 * The print floor: where each ready plate is (to print → printing → to inspect → done, or print
 * failed), every move with who made it, and inspections of finished slabs piece by piece.
 */
export const FLOOR_STATES = ["to_print", "printing", "print_failed", "to_inspect", "reprint_needed", "done"] as const;
export type FloorState = (typeof FLOOR_STATES)[number];

export const floorEvents = pgTable(
  "floor_events",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    plateId: text("plate_id")
      .notNull()
      .references(() => plates.id, { onDelete: "cascade" }),
    fromState: text("from_state").$type<FloorState | null>(),
    toState: text("to_state").$type<FloorState>().notNull(),
    note: text("note"),
    byUserId: text("by_user_id").references(() => users.id, { onDelete: "set null" }),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("floor_events_plate_idx").on(t.plateId, t.at)],
);

export type PieceCheck = { number: number; state: "present" | "missing" | "defective"; note?: string };

export const inspections = pgTable(
  "inspections",
  {
    id: text("id")
      .primaryKey()
      .$defaultFn(() => crypto.randomUUID()),
    workspaceId: text("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    plateId: text("plate_id")
      .notNull()
      .references(() => plates.id, { onDelete: "cascade" }),
    results: jsonb("results").$type<PieceCheck[]>().notNull(),
    /** The plate's first inspection counts for first-pass yield. */
    first: boolean("first").notNull(),
    missing: integer("missing").notNull(),
    defective: integer("defective").notNull(),
    byUserId: text("by_user_id").references(() => users.id, { onDelete: "set null" }),
    at: timestamp("at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("inspections_workspace_at_idx").on(t.workspaceId, t.at), index("inspections_plate_idx").on(t.plateId)],
);

export type Inspection = typeof inspections.$inferSelect;
