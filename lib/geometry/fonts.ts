import opentype from "opentype.js";

/**
 * The engraving faces, by id. The files ship in fonts/ (see fonts/README.md); the engine receives their
 * bytes from its caller (a route reads the file, a Web Worker fetches it), so this module stays pure.
 */
export const ENGRAVING_FONTS = {
  "sans-bold": { file: "DejaVuSans-Bold.ttf", label: "Sans bold" },
  "mono-bold": { file: "DejaVuSansMono-Bold.ttf", label: "Mono bold" },
} as const;

export type EngravingFontId = keyof typeof ENGRAVING_FONTS;

export const DEFAULT_ENGRAVING_FONT: EngravingFontId = "sans-bold";

export function isEngravingFontId(id: string): id is EngravingFontId {
  return Object.hasOwn(ENGRAVING_FONTS, id);
}

export type FontBook = Record<EngravingFontId, opentype.Font>;

/** Parse the engraving faces from their bytes (the caller reads or fetches the files in fonts/). */
export function parseFontBook(buffers: Record<EngravingFontId, ArrayBuffer | Uint8Array>): FontBook {
  const out = {} as FontBook;
  for (const id of Object.keys(ENGRAVING_FONTS) as EngravingFontId[]) {
    const b = buffers[id];
    const ab = b instanceof Uint8Array ? (b.buffer.slice(b.byteOffset, b.byteOffset + b.byteLength) as ArrayBuffer) : b;
    out[id] = opentype.parse(ab);
  }
  return out;
}
