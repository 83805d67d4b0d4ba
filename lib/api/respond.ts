import "server-only";
import { ZodError } from "zod";
import { AccessError } from "@/lib/auth/errors";
import { UserError } from "@/lib/auth/errors";

/** Statuses for refusals a person can act on; anything else of that kind is a 422. */
const USER_ERROR_STATUS: Record<string, number> = { not_found: 404, part_in_use: 409, conflict: 409 };

/** A refusal with its HTTP status, code and details, thrown anywhere under a route. */
export class ApiProblem extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = "ApiProblem";
  }
}

/** The public API's error body: `{ "error": { "code", "message", "details"? } }`. */
export function apiError(status: number, code: string, message: string, details?: unknown, headers?: HeadersInit): Response {
  return Response.json({ error: details === undefined ? { code, message } : { code, message, details } }, { status, headers });
}

/** Wrap a route handler: map our error classes to statuses; log anything else and answer 500 without its text. */
export function apiRoute<C>(handler: (req: Request, ctx: C) => Promise<Response>) {
  return async (req: Request, ctx: C): Promise<Response> => {
    try {
      return await handler(req, ctx);
    } catch (err) {
      if (err instanceof AccessError) {
        return apiError(err.status, err.code, err.message, undefined, err.retryAfterSeconds ? { "Retry-After": String(err.retryAfterSeconds) } : undefined);
      }
      if (err instanceof ApiProblem) return apiError(err.status, err.code, err.message, err.details);
      if (err instanceof UserError) return apiError(USER_ERROR_STATUS[err.code] ?? 422, err.code, err.message);
      if (err instanceof ZodError) return apiError(422, "invalid", "The request does not match the API's schema.", err.issues);
      console.error(`[api] ${req.method} ${new URL(req.url).pathname} failed`, err);
      return apiError(500, "internal", "Something went wrong on our side; nothing was changed.");
    }
  };
}
