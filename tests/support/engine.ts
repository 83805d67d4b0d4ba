import { readFileSync } from "node:fs";
import path from "node:path";
import { deflateRawSync } from "node:zlib";
import { ENGRAVING_FONTS, parseFontBook, type FontBook } from "@/lib/geometry/fonts";
import { loadKernel, type Kernel } from "@/lib/geometry/kernel";

export function fontBytes(id: keyof typeof ENGRAVING_FONTS): Buffer {
  return readFileSync(path.join(process.cwd(), "fonts", ENGRAVING_FONTS[id].file));
}

export function loadFonts(): FontBook {
  return parseFontBook({ "sans-bold": fontBytes("sans-bold"), "mono-bold": fontBytes("mono-bold") });
}

export async function engine(): Promise<{ kernel: Kernel; fonts: FontBook }> {
  return { kernel: await loadKernel(), fonts: loadFonts() };
}

export const zlibDeflate = (d: Uint8Array) => deflateRawSync(d, { level: 1 });
