import { z } from "zod";

/** Fields of the plate API's multipart form, shared by the route and the OpenAPI document. */
export const formatSchema = z.enum(["stl", "3mf", "json"]);
export const variablesSchema = z.record(z.string().regex(/^[a-z][a-z0-9_]*$/i), z.string().max(500));
export const quantitySchema = z.array(z.number().int().min(1).max(500));
