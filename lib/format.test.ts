import { describe, expect, it } from "vitest";
import { aOrAn, amount, day } from "./format";

describe("day", () => {
  const now = new Date("2026-12-10T12:00:00Z");
  it("writes a day of this year as en-GB does: day first, abbreviated month, no year", () => {
    // CLDR's en-GB "d MMM" pattern, with its abbreviated month names (Unicode CLDR, gregorian calendar).
    expect(day(new Date("2026-12-03T23:59:00Z"), now)).toBe("3 Dec");
    expect(day("2026-01-15T00:00:00Z", now)).toBe("15 Jan");
  });
  it("adds the year when it is another year's, and reads the day in UTC", () => {
    expect(day(new Date("2025-12-31T23:30:00Z"), now)).toBe("31 Dec 2025");
    expect(day(new Date("2027-01-01T00:30:00Z"), now)).toBe("1 Jan 2027");
  });
});

describe("aOrAn", () => {
  it("puts 'an' before the roles that start with a vowel and 'a' before the others", () => {
    expect(["owner", "designer", "operator", "viewer"].map(aOrAn)).toEqual(["an owner", "a designer", "an operator", "a viewer"]);
  });
});

describe("amount", () => {
  it("writes minor units with the currency's sign and decimals, as en-GB does", () => {
    // ISO 4217 minor units: EUR and GBP have 2, JPY has 0 (CLDR en-GB symbols: €, £, US$, JP¥).
    expect(amount(7900)).toBe("€79.00");
    expect(amount(500, "gbp")).toBe("£5.00");
    expect(amount(1250, "USD")).toBe("US$12.50");
    expect(amount(1900, "JPY")).toBe("JP¥1,900");
  });
  it("falls back to the number and the code for a code that is not one", () => {
    expect(amount(100, "€€")).toBe("1.00 €€");
  });
});
