import { z } from "zod";
import { EXPORT_FORMAT_IDS } from "@/lib/geometry/formats";

/** Fields of the plate API's multipart form, shared by the route and the OpenAPI document. */
/** What the plate API answers with: a plate file (formats.ts) or the plate as JSON. */
export const formatSchema = z.enum([...EXPORT_FORMAT_IDS, "json"]);
export const variablesSchema = z.record(z.string().regex(/^[a-z][a-z0-9_]*$/i), z.string().max(500));
export const quantitySchema = z.array(z.number().int().min(1).max(500));

/**
 * An order system's own reference for a plate ("ORD-1042"): up to 80 characters, no control characters;
 * blank is none. Shown wherever the plate is named and searchable on the floor.
 */
export const referenceSchema = z
  .string()
  .trim()
  .max(80, "reference must be at most 80 characters.")
  .regex(/^[^\p{Cc}]*$/u, "reference must not hold control characters.");

/** A part's length unit in the plate API (STL and OBJ carry none; a 3MF's own is overridden). */
export const unitSchema = z.enum(["mm", "cm", "m", "in"]);
/** `units`: one unit for every part file, or a JSON array of them in part order (like `quantity`). */
export const unitsSchema = z.union([unitSchema, z.array(unitSchema)]);
