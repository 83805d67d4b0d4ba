/**
 * A count with its noun in the right number ("1 piece", "2 pieces", "0 pieces"), by the language's
 * plural rules (Intl.PluralRules, en-GB: "one" for 1 only). `many` is the plural form when it is not
 * the noun with an "s".
 */
const rules = new Intl.PluralRules("en-GB");

export function plural(n: number, one: string, many = `${one}s`): string {
  return `${n.toLocaleString("en-GB")} ${rules.select(n) === "one" ? one : many}`;
}
