/**
 * PostgreSQL refuses some input itself: a NUL character in text (22021), a value its type cannot
 * read (22P02), a broken escape (22P05), a number out of range (22003), a string too long (22001).
 * These are the caller's mistake, not ours: answer them as bad input, never as a server fault.
 */
const BAD_INPUT_CODES = new Set(["22021", "22P02", "22P05", "22003", "22001", "22007", "22008"]);

export function isBadInputDbError(err: unknown): boolean {
  for (let e: unknown = err, depth = 0; e && depth < 5; depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === "string" && BAD_INPUT_CODES.has(code)) return true;
    e = (e as { cause?: unknown }).cause;
  }
  return false;
}

/** A NUL character anywhere in a value that will become SQL text. */
export const hasNul = (s: string) => s.includes("\u0000");
