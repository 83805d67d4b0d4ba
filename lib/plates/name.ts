/**
 * How a plate is named wherever people see it (the floor, the plate map, the 3MF's Title, mail): the
 * order system's reference first when there is one, then the kit or the parts it holds.
 */
export function plateName(p: { reference?: string | null; title?: string | null; kitName?: string | null }): string {
  const what = p.kitName ?? p.title ?? "Plate";
  return p.reference ? `${p.reference} · ${what}` : what;
}

/** A plate's title from the part files an order sent: their names without extensions, the first three and how many more. */
export function titleFromParts(names: string[]): string {
  const stems = [...new Set(names.map((n) => n.replace(/\.[a-z0-9]+$/i, "").trim()).filter(Boolean))];
  if (!stems.length) return "Plate";
  const shown = stems.slice(0, 3).join(", ");
  return stems.length > 3 ? `${shown} and ${stems.length - 3} more` : shown;
}
