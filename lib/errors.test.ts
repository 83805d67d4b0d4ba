import { describe, expect, it } from "vitest";
import {
  AppError,
  BadRequest,
  Conflict,
  Forbidden,
  formMessage,
  httpStatus,
  Invalid,
  NotFound,
  PlanLimit,
  RateLimited,
  TooLarge,
  Unauthorized,
  Unavailable,
  UnsupportedMedia,
  notFound,
  rateLimited,
} from "./errors";

describe("one error table", () => {
  // RFC 9110 §15 (400, 401, 403, 404, 409, 413, 415, 422, 503), RFC 6585 §4 (429), and 402 "Payment
  // Required" (RFC 9110 §15.5.3, reserved; used here as payment providers' APIs do for a plan limit).
  it.each([
    [BadRequest, 400],
    [Unauthorized, 401],
    [PlanLimit, 402],
    [Forbidden, 403],
    [NotFound, 404],
    [Conflict, 409],
    [TooLarge, 413],
    [UnsupportedMedia, 415],
    [Invalid, 422],
    [Unavailable, 503],
  ] as const)("%o answers %i", (Cls, status) => {
    const e = new Cls("some_code", "What to change.");
    expect(e).toBeInstanceOf(AppError);
    expect(e.name).toBe(Cls.name);
    expect(httpStatus(e)).toBe(status);
    expect(formMessage(e)).toBe(Cls === Unauthorized ? "Your session has ended; sign in again." : "What to change.");
  });

  it("a rate limit carries when to come back; a plain AppError is a 422", () => {
    const r = rateLimited(30, "sign-in tries");
    expect(r).toBeInstanceOf(RateLimited);
    expect(httpStatus(r)).toBe(429);
    expect(r.retryAfterSeconds).toBe(30);
    expect(r.message).toBe("Too many sign-in tries. Try again in 30 seconds.");
    expect(httpStatus(new AppError("x", "y"))).toBe(422);
  });

  it("keeps the field and details it was given", () => {
    const e = new PlanLimit("plan_limit", "Upgrade under Settings → Billing.", { plan: "bench" }, "options.marks.logo");
    expect(e.field).toBe("options.marks.logo");
    expect(e.details).toEqual({ plan: "bench" });
    expect(notFound("plate").message).toBe("No such plate.");
  });
});
