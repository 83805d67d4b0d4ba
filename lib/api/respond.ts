import "server-only";
import { env } from "@/lib/env";
import { ZodError } from "zod";
import { AppError, RateLimited, httpStatus } from "@/lib/errors";
import { hasNul, isBadInputDbError } from "@/lib/db-errors";

function safeDecode(url: string): string {
  try {
    return decodeURIComponent(url);
  } catch {
    return url;
  }
}

/** The public API's error body: `{ "error": { "code", "message", "details"? } }`. */
export function apiError(status: number, code: string, message: string, details?: unknown, headers?: HeadersInit): Response {
  return Response.json({ error: details === undefined ? { code, message } : { code, message, details } }, { status, headers });
}

const SAFE_METHODS = new Set(["GET", "HEAD", "OPTIONS"]);

/**
 * A browser request that changes something and carries our session cookie must come from our own
 * pages: Sec-Fetch-Site same-origin (or none: typed by the person), else an Origin equal to ours.
 * Requests with neither header are not from a browser, so no other site can have sent them on the
 * person's behalf. API-key calls carry no session cookie and are not affected.
 */
export function crossSiteProblem(req: Request): Response | null {
  if (SAFE_METHODS.has(req.method.toUpperCase())) return null;
  const cookie = req.headers.get("cookie") ?? "";
  if (!/(^|;\s*)(__Secure-)?authjs\.session-token=/.test(cookie)) return null;
  const site = req.headers.get("sec-fetch-site");
  if (site === "same-origin" || site === "none") return null;
  const origin = req.headers.get("origin");
  if (!site && !origin) return null;
  if (origin && !site && sameOrigin(origin, req)) return null;
  return apiError(403, "cross_site", "This request came from another site and was refused. Use Slabwright's own pages.");
}

function sameOrigin(origin: string, req: Request): boolean {
  const own = new Set([new URL(req.url).origin]);
  own.add(new URL(env().AUTH_URL).origin);
  const host = req.headers.get("host");
  if (host) own.add(`${new URL(req.url).protocol}//${host}`);
  return own.has(origin);
}

/** Wrap a route handler: map our error classes to statuses; log anything else and answer 500 without its text. */
export function apiRoute<C>(handler: (req: Request, ctx: C) => Promise<Response>) {
  return async (req: Request, ctx: C): Promise<Response> => {
    const crossSite = crossSiteProblem(req);
    if (crossSite) return crossSite;
    if (hasNul(safeDecode(req.url)))
      return apiError(400, "bad_request", "The address holds a NUL character, which no name, id or search can contain.");
    try {
      return await handler(req, ctx);
    } catch (err) {
      if (err instanceof AppError) {
        return apiError(
          httpStatus(err),
          err.code,
          err.message,
          err.details,
          err instanceof RateLimited ? { "Retry-After": String(err.retryAfterSeconds) } : undefined,
        );
      }
      if (err instanceof ZodError) return apiError(422, "invalid", "The request does not match the API's schema.", err.issues);
      // req.json() on a body that is not JSON.
      if (err instanceof SyntaxError) return apiError(400, "bad_json", "The request body is not valid JSON.");
      if (isBadInputDbError(err))
        return apiError(
          400,
          "bad_request",
          "The request holds a value that cannot be stored (a NUL character, or a number or text out of range).",
        );
      console.error(`[api] ${req.method} ${new URL(req.url).pathname} failed`, err);
      return apiError(500, "internal", "Something went wrong on our side; nothing was changed.");
    }
  };
}
