/** Millimetres with the unit, one decimal unless finer matters (design.md). */
export function mm(value: number, decimals = 1): string {
  return `${value.toFixed(decimals)} mm`;
}

export function size3(x: number, y: number, z: number): string {
  return `${x.toFixed(1)} × ${y.toFixed(1)} × ${z.toFixed(1)} mm`;
}

/** mm³ shown as cm³ once it is large enough to read better that way. */
export function volume(mm3: number): string {
  return mm3 >= 1000 ? `${(mm3 / 1000).toFixed(2)} cm³` : `${mm3.toFixed(0)} mm³`;
}

export function count(n: number): string {
  return n.toLocaleString("en-US");
}

export function when(d: Date | string | null | undefined): string {
  if (!d) return "—";
  const date = typeof d === "string" ? new Date(d) : d;
  return date.toISOString().slice(0, 16).replace("T", " ");
}

/** A day as people write it in en-GB: "3 Dec", with the year when it is not this year's ("3 Dec 2025"). UTC, like `when`. */
export function day(d: Date | string, now: Date = new Date()): string {
  const date = typeof d === "string" ? new Date(d) : d;
  const sameYear = date.getUTCFullYear() === now.getUTCFullYear();
  return date.toLocaleDateString("en-GB", { day: "numeric", month: "short", ...(sameYear ? {} : { year: "numeric" }), timeZone: "UTC" });
}

/** "a designer", "an operator": the indefinite article English uses before the word's first sound (here, its first letter). */
export function aOrAn(word: string): string {
  return `${/^[aeiou]/i.test(word) ? "an" : "a"} ${word}`;
}

/**
 * An amount in the smallest unit of its currency (cents), as en-GB writes it: "€19.00", "£5.00",
 * "US$12.50". Euro unless told otherwise: a workspace has no currency setting, and the plans are priced in euro.
 */
export function amount(minorUnits: number, currency = "EUR"): string {
  const code = currency.toUpperCase();
  try {
    const f = new Intl.NumberFormat("en-GB", { style: "currency", currency: code });
    return f.format(minorUnits / 10 ** (f.resolvedOptions().maximumFractionDigits ?? 2));
  } catch {
    return `${(minorUnits / 100).toFixed(2)} ${code}`; // not an ISO 4217 code Intl knows
  }
}
