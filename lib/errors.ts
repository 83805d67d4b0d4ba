/**
 * The app's one error hierarchy. Services throw these and never mention HTTP: `ERROR_TABLE` below is
 * the only place a class becomes a status (route handlers, through `apiRoute`) or a form message
 * (server actions, through `guardedAction`). Anything that is not an AppError is a bug: logged with
 * its cause and answered with a message that does not repeat it.
 */

/** A refusal a person or a client can act on: a stable code, a message saying what to change. */
export class AppError extends Error {
  constructor(
    readonly code: string,
    message: string,
    /** Machine-readable facts for API clients (e.g. the plan and its limit). */
    readonly details?: unknown,
    /** The form field (dot path) the refusal belongs to, where there is one. */
    readonly field?: string,
  ) {
    super(message);
    this.name = new.target.name;
  }

  /** Its HTTP status, read from the one table (services never choose it). */
  get status(): number {
    return httpStatus(this);
  }
}

/** The request itself is malformed: not JSON, a cut-off body, a NUL in an id. */
export class BadRequest extends AppError {}
/** Nobody is signed in, or the API key is missing, unknown or revoked. */
export class Unauthorized extends AppError {}
/** The plan does not allow this, or its quota for the period is used. */
export class PlanLimit extends AppError {}
/** Signed in, but the role or the key's scopes do not allow this. */
export class Forbidden extends AppError {}
/** No such record, or another workspace's: the same answer, so nothing leaks. */
export class NotFound extends AppError {}
/** The record's state forbids it (in use, already done, a reused key with another request). */
export class Conflict extends AppError {}
/** Past a size limit (file, field, number of files). */
export class TooLarge extends AppError {}
/** Not a kind of content we read. */
export class UnsupportedMedia extends AppError {}
/** Well-formed but not acceptable: a value out of range, a finding of severity error. */
export class Invalid extends AppError {}
/** Too many tries; `retryAfterSeconds` says when to come back. */
export class RateLimited extends AppError {
  constructor(
    code: string,
    message: string,
    readonly retryAfterSeconds: number,
  ) {
    super(code, message, undefined);
  }
}
/** A service we depend on is down for now (storage, the queue). */
export class Unavailable extends AppError {}

type Row = { status: number; form?: (e: AppError) => string };

/** Class → HTTP status and form message. Order matters only for subclasses of subclasses (none today). */
const ERROR_TABLE: [abstract new (...a: never[]) => AppError, Row][] = [
  [BadRequest, { status: 400 }],
  [Unauthorized, { status: 401, form: () => "Your session has ended; sign in again." }],
  [PlanLimit, { status: 402 }],
  [Forbidden, { status: 403 }],
  [NotFound, { status: 404 }],
  [Conflict, { status: 409 }],
  [TooLarge, { status: 413 }],
  [UnsupportedMedia, { status: 415 }],
  [Invalid, { status: 422 }],
  [RateLimited, { status: 429 }],
  [Unavailable, { status: 503 }],
];

function row(e: AppError): Row {
  for (const [cls, r] of ERROR_TABLE) if (e instanceof cls) return r;
  return { status: 422 };
}

/** The HTTP status of a refusal (an AppError of no listed subclass is a 422). */
export function httpStatus(e: AppError): number {
  return row(e).status;
}

/** What a form shows for a refusal. */
export function formMessage(e: AppError): string {
  return row(e).form?.(e) ?? e.message;
}

// The guards' common refusals.
export const notSignedIn = () => new Unauthorized("unauthorized", "Sign in first.");
export const forbidden = (what: string) => new Forbidden("forbidden", `Your role does not allow this: ${what}.`);
export const notFound = (what = "record") => new NotFound("not_found", `No such ${what}.`);
export const rateLimited = (seconds: number, what: string) =>
  new RateLimited(
    "rate_limited",
    `Too many ${what}. Try again in ${seconds < 90 ? `${seconds} seconds` : `${Math.ceil(seconds / 60)} minutes`}.`,
    seconds,
  );
