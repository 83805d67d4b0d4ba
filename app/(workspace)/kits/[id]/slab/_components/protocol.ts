import type { KitPart } from "@/db/schema";
import type { Finding } from "@/lib/geometry/checks";
import type { Estimates } from "@/lib/geometry/estimates";
import type { PlacedPiece, PlateLayout, TriedLayout } from "@/lib/geometry/build-plate";
import type { SlabOptionsInput } from "@/lib/geometry/options";

/**
 * Messages between the slab editor and its Web Worker, which runs the same lib/geometry engine as the
 * server. The worker keeps the parts' meshes between edits; each `build` re-lays and re-marks the slab.
 */
export type EditorPart = { id: string; name: string; quantity: number; rotation: number; orientation: KitPart["orientation"] };

export type ToWorker =
  { type: "init"; parts: EditorPart[] } | { type: "build"; seq: number; options: SlabOptionsInput; variables: Record<string, string> };

export type Body = { name: string; piece?: number; positions: Float32Array; indices: Uint32Array };

/**
 * A part as the 3D view draws it: sent once, then every piece made from it is the same geometry
 * moved and turned (a piece's x, y, z and rotation), so an edit only sends the new slab. Parts with
 * many triangles are sent decimated (the files made on the server keep every triangle).
 */
export type DisplayPart = { id: string; positions: Float32Array; indices: Uint32Array; triangles: number; shownTriangles: number };

export type FromWorker =
  | { type: "ready"; ms: number; triangles: number; parts: DisplayPart[] }
  | {
      type: "built";
      seq: number;
      ms: number;
      slab: Body | null;
      pieces: PlacedPiece[];
      layout: PlateLayout | null;
      /** The pieces do not fit the bed: where they were tried. */
      tried: TriedLayout | null;
      findings: Finding[];
      estimates: Estimates | null;
    }
  | { type: "error"; seq?: number; message: string };
