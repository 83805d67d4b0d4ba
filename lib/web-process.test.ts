import { existsSync, readdirSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";

// The web process never parses a mesh or runs the geometry kernel: a crafted file must not stall the
// pages and the API of every tenant (OWASP ASVS 4.0 V12.1.1, "the application will not accept large
// files that could fill up storage or cause a denial of service"; the import runs in build workers).
// This follows every server entry point's imports (route handlers, server actions, pages and
// layouts that are not client components) and fails if one reaches the importer or the kernel.
const ROOT = process.cwd();
const FORBIDDEN = ["lib/geometry/import.ts", "lib/geometry/kernel.ts", "lib/geometry/build-plate.ts"].map((p) => path.join(ROOT, p));

function files(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const p = path.join(dir, name);
    return statSync(p).isDirectory() ? files(p) : [p];
  });
}

function resolve(from: string, spec: string): string | null {
  const base = spec.startsWith("@/")
    ? path.join(ROOT, spec.slice(2))
    : spec.startsWith(".")
      ? path.resolve(path.dirname(from), spec)
      : null;
  if (!base) return null;
  for (const c of [base, `${base}.ts`, `${base}.tsx`, path.join(base, "index.ts"), path.join(base, "index.tsx")])
    if (existsSync(c) && statSync(c).isFile()) return c;
  return null;
}

const isClient = (text: string) => /^\s*["']use client["']/.test(text);

/** The server-side modules reachable from `entry` by value imports (type-only imports carry no code). */
function chain(entry: string): Map<string, string> {
  const via = new Map<string, string>([[entry, ""]]);
  const todo = [entry];
  while (todo.length) {
    const file = todo.pop()!;
    const text = readFileSync(file, "utf8");
    for (const m of text.matchAll(/^\s*(?:import|export)\s+(?!type\s)[^'"]*?from\s+["']([^"']+)["']|import\(\s*["']([^"']+)["']\s*\)/gm)) {
      const target = resolve(file, m[1] ?? m[2]!);
      if (!target || via.has(target) || !/\.(ts|tsx|mjs|js)$/.test(target)) continue;
      // A client component runs in the browser (the editor's preview builds there, in a Web Worker).
      if (isClient(readFileSync(target, "utf8"))) continue;
      via.set(target, file);
      todo.push(target);
    }
  }
  return via;
}

describe("the web process", () => {
  it("never imports the mesh importer or the geometry kernel from a route, action, page or layout", () => {
    const entries = files(path.join(ROOT, "app")).filter(
      (f) => /(route|actions|page|layout)\.tsx?$/.test(f) && !isClient(readFileSync(f, "utf8")),
    );
    entries.push(path.join(ROOT, "proxy.ts"), path.join(ROOT, "instrumentation.ts"));
    expect(entries.length).toBeGreaterThan(20);
    const offenders: string[] = [];
    for (const entry of entries) {
      const via = chain(entry);
      for (const bad of FORBIDDEN) {
        if (!via.has(bad)) continue;
        const path_: string[] = [];
        for (let f: string | undefined = bad; f; f = via.get(f) || undefined) path_.unshift(path.relative(ROOT, f));
        offenders.push(path_.join(" → "));
      }
    }
    expect(offenders).toEqual([]);
  });
});
