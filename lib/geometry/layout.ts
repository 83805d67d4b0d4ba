/**
 * Packing pieces' rectangles onto the slab: the MaxRects algorithm with the best-short-side-fit rule
 * (J. Jylänki, "A Thousand Ways to Pack the Bin", 2010), allowing quarter turns. Deterministic: the
 * same input gives the same layout. Spacing is kept by growing every rectangle (and the bin) by it.
 */
/** A rectangle to place, with one or more sizes it may take (e.g. as it is, and turned a quarter). */
export type PackItem = { key: number; sizes: [number, number][] };
export type Packed = { key: number; x: number; y: number; w: number; h: number; choice: number };

type Free = { x: number; y: number; w: number; h: number };

export function maxRectsPack(items: PackItem[], binW: number, binH: number, spacing: number): Packed[] | null {
  const W = binW + spacing,
    H = binH + spacing;
  let free: Free[] = [{ x: 0, y: 0, w: W, h: H }];
  const out: Packed[] = [];
  // Largest first; ties broken by key so the order never depends on sort stability.
  const dims = (i: PackItem) => i.sizes[0]!;
  const order = [...items].sort(
    (a, b) => dims(b)[0] * dims(b)[1] - dims(a)[0] * dims(a)[1] || Math.max(...dims(b)) - Math.max(...dims(a)) || a.key - b.key,
  );
  for (const it of order) {
    let best: { f: Free; w: number; h: number; choice: number; short: number; long: number } | null = null;
    const tryFit = (w: number, h: number, choice: number) => {
      for (const f of free) {
        if (w <= f.w + 1e-9 && h <= f.h + 1e-9) {
          const short = Math.min(f.w - w, f.h - h),
            long = Math.max(f.w - w, f.h - h);
          // Bottom-left tie break keeps layouts compact and stable.
          if (
            !best ||
            short < best.short - 1e-9 ||
            (Math.abs(short - best.short) <= 1e-9 &&
              (long < best.long - 1e-9 || (Math.abs(long - best.long) <= 1e-9 && (f.y < best.f.y || (f.y === best.f.y && f.x < best.f.x)))))
          ) {
            best = { f, w, h, choice, short, long };
          }
        }
      }
    };
    it.sizes.forEach(([w, h], choice) => tryFit(w + spacing, h + spacing, choice));
    if (!best) return null;
    const b: { f: Free; w: number; h: number; choice: number } = best;
    const placed = { x: b.f.x, y: b.f.y, w: b.w, h: b.h };
    out.push({ key: it.key, x: placed.x, y: placed.y, w: b.w - spacing, h: b.h - spacing, choice: b.choice });
    // Split every free rectangle the new one overlaps, then drop free rectangles inside others.
    const next: Free[] = [];
    for (const f of free) {
      if (placed.x >= f.x + f.w || placed.x + placed.w <= f.x || placed.y >= f.y + f.h || placed.y + placed.h <= f.y) {
        next.push(f);
        continue;
      }
      if (placed.x > f.x) next.push({ x: f.x, y: f.y, w: placed.x - f.x, h: f.h });
      if (placed.x + placed.w < f.x + f.w) next.push({ x: placed.x + placed.w, y: f.y, w: f.x + f.w - placed.x - placed.w, h: f.h });
      if (placed.y > f.y) next.push({ x: f.x, y: f.y, w: f.w, h: placed.y - f.y });
      if (placed.y + placed.h < f.y + f.h) next.push({ x: f.x, y: placed.y + placed.h, w: f.w, h: f.y + f.h - placed.y - placed.h });
    }
    free = next.filter((a, i) => !next.some((b2, j) => j !== i && contains(b2, a) && (!contains(a, b2) || j < i)));
  }
  return out;
}

function contains(a: Free, b: Free): boolean {
  return b.x >= a.x - 1e-9 && b.y >= a.y - 1e-9 && b.x + b.w <= a.x + a.w + 1e-9 && b.y + b.h <= a.y + a.h + 1e-9;
}

export type Arrangement = { packed: Packed[]; width: number; height: number };

/**
 * Find a compact arrangement inside at most maxW × maxH: pack into strips of several widths and keep
 * the one whose bounding box has the least area (with a mild preference for square), since a
 * smaller slab prints faster and warps less. `score` rates a candidate's width and height (lower is
 * better): the slab builder passes one that counts what else sits on the slab (text and QR bands) and
 * the slab's shape, so a disc asks for the smallest enclosing circle, not the smallest rectangle.
 */
export function arrange(
  items: PackItem[],
  maxW: number,
  maxH: number,
  spacing: number,
  score: (width: number, height: number) => number = areaScore,
): Arrangement | null {
  if (items.length === 0) return { packed: [], width: 0, height: 0 };
  const area = items.reduce((s, i) => s + (i.sizes[0]![0] + spacing) * (i.sizes[0]![1] + spacing), 0);
  const minSide = Math.max(...items.map((i) => Math.min(...i.sizes.map((d) => d[0]))));
  const lo = Math.max(minSide, Math.min(maxW, Math.sqrt(area) * 0.7));
  let best: (Arrangement & { score: number }) | null = null;
  const steps = 24;
  for (let k = 0; k <= steps; k++) {
    const w = lo + ((maxW - lo) * k) / steps;
    const packed = maxRectsPack(items, w, maxH, spacing);
    if (!packed) continue;
    const width = Math.max(...packed.map((p) => p.x + p.w));
    const height = Math.max(...packed.map((p) => p.y + p.h));
    const s = score(width, height);
    if (!best || s < best.score - 1e-9) best = { packed, width, height, score: s };
  }
  return best ? { packed: best.packed, width: best.width, height: best.height } : null;
}

/** Rectangle area with a mild preference for square. */
export function areaScore(width: number, height: number): number {
  const aspect = Math.max(width, height) / Math.max(1e-9, Math.min(width, height));
  return width * height * (1 + 0.05 * (aspect - 1));
}
