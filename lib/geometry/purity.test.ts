import { readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

// lib/geometry runs unchanged in a route handler, a worker thread and a browser Web Worker, so its
// (non-test) sources may import only each other and browser-safe packages.
const ROOT = path.join(process.cwd(), "lib", "geometry");
const ALLOWED_PACKAGES = new Set([
  "manifold-3d",
  "earcut",
  "fflate",
  "saxes",
  "opentype.js",
  "qrcode",
  "svgpath",
  "zod",
  "quickhull3d",
  "poly-decomp-es",
]);

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    if (statSync(p).isDirectory()) return sources(p);
    return /\.tsx?$/.test(name) && !/\.test\.tsx?$/.test(name) ? [p] : [];
  });
}

describe("the engine's purity rule", () => {
  it("imports nothing from next, react, drizzle, node: or the rest of lib/", () => {
    const offenders: string[] = [];
    for (const file of sources(ROOT)) {
      const text = readFileSync(file, "utf8");
      for (const m of text.matchAll(/(?:import|export)\s[^'"]*?from\s+["']([^"']+)["']|import\(\s*["']([^"']+)["']\s*\)/g)) {
        const spec = m[1] ?? m[2]!;
        if (spec.startsWith(".")) {
          const target = path.resolve(path.dirname(file), spec);
          if (!target.startsWith(ROOT)) offenders.push(`${path.relative(ROOT, file)} → ${spec}`);
          continue;
        }
        const pkg = spec.startsWith("@") ? spec.split("/").slice(0, 2).join("/") : spec.split("/")[0]!;
        if (!ALLOWED_PACKAGES.has(pkg)) offenders.push(`${path.relative(ROOT, file)} → ${spec}`);
      }
    }
    expect(offenders).toEqual([]);
  });
});
