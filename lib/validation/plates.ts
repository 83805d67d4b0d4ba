import { z } from "zod";

/** Fields of the plate API's multipart form, shared by the route and the OpenAPI document. */
export const formatSchema = z.enum(["stl", "3mf", "json"]);
export const variablesSchema = z.record(z.string().regex(/^[a-z][a-z0-9_]*$/i), z.string().max(500));
export const quantitySchema = z.array(z.number().int().min(1).max(500));

/** A part's length unit in the plate API (STL and OBJ carry none; a 3MF's own is overridden). */
export const unitSchema = z.enum(["mm", "cm", "m", "in"]);
/** `units`: one unit for every part file, or a JSON array of them in part order (like `quantity`). */
export const unitsSchema = z.union([unitSchema, z.array(unitSchema)]);
