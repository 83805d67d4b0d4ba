/** Placeholders in text and QR values: `{order}`, `{customer}`, `{date}`, `{kit}` and any a template defines. */
export const PLACEHOLDER = /\{([a-z][a-z0-9_]*)\}/gi;

export function placeholders(value: string): string[] {
  return [...new Set([...value.matchAll(PLACEHOLDER)].map((m) => m[1]!.toLowerCase()))];
}

/** Fill placeholders from `vars`; unknown ones are left as written so a check can point at them. */
export function fillPlaceholders(value: string, vars: Record<string, string>): string {
  return value.replace(PLACEHOLDER, (whole, name: string) => vars[name.toLowerCase()] ?? whole);
}

/** The placeholders still in a filled value, as written (a check names each one that has no value). */
export function unfilledPlaceholders(value: string): string[] {
  return [...value.matchAll(PLACEHOLDER)].map((m) => m[0]);
}
