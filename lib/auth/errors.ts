/** Access outcomes every guard speaks; route handlers map them to statuses, pages to messages. */
export class AccessError extends Error {
  constructor(
    readonly status: 401 | 403 | 404 | 429,
    readonly code: string,
    message: string,
    readonly retryAfterSeconds?: number,
  ) {
    super(message);
    this.name = "AccessError";
  }
}

export const notSignedIn = () => new AccessError(401, "unauthorized", "Sign in first.");
export const forbidden = (what: string) => new AccessError(403, "forbidden", `Your role does not allow this: ${what}.`);
/** Another workspace's record, or one that does not exist: the same answer, so nothing leaks. */
export const notFound = (what = "record") => new AccessError(404, "not_found", `No such ${what}.`);
export const rateLimited = (seconds: number, what: string) =>
  new AccessError(429, "rate_limited", `Too many ${what}. Try again in ${seconds < 90 ? `${seconds} seconds` : `${Math.ceil(seconds / 60)} minutes`}.`, seconds);

/** A refusal a person can act on (the last owner, an already-used link), optionally tied to a field. */
export class UserError extends Error {
  constructor(
    readonly code: string,
    message: string,
    readonly field?: string,
  ) {
    super(message);
    this.name = "UserError";
  }
}
