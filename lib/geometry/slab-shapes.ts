/**
 * The slab shapes by name, in one table that the options schema and the editor's picker read. Each
 * shape's behaviour (its outline round the content, how the packer rates a layout for it, how text
 * sits on it) is `SHAPE_RULES` in slab.ts, typed by these keys: a new shape is a row here, its rules
 * there (the compiler asks for them) and its tests. No other import, so the schema can use it.
 */
export const SLAB_SHAPES = {
  "rounded-rect": { label: "rounded rectangle" },
  disc: { label: "disc" },
  contour: { label: "follows the pieces" },
} as const satisfies Record<string, { label: string }>;

export type SlabShapeId = keyof typeof SLAB_SHAPES;
/** The shapes in the table's order; the first is the default. */
export const SLAB_SHAPE_IDS = Object.keys(SLAB_SHAPES) as [SlabShapeId, ...SlabShapeId[]];
