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
