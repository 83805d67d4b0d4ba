declare module "fontkit" {
  type Position = { xAdvance: number; yAdvance: number; xOffset: number; yOffset: number };
  export type Font = { unitsPerEm: number; layout(text: string, features?: Record<string, boolean>): { positions: Position[] } };
  export function create(buffer: Uint8Array): Font;
}
