/**
 * What a format parser hands to the import pipeline: vertices and triangles as read, before any weld
 * or repair. STL gives a triangle soup (three fresh vertices per triangle); OBJ and 3MF give indexed
 * meshes. One file may yield several named objects.
 */
export type RawObject = {
  name: string;
  positions: Float32Array;
  triangles: Uint32Array;
};

export type RawModel = {
  format: "stl" | "3mf" | "obj";
  /** Length unit the file declares (3MF), or null when the format has none (STL, OBJ). */
  declaredUnit: Unit | null;
  objects: RawObject[];
};

export const UNIT_MM = { micron: 0.001, millimeter: 1, centimeter: 10, inch: 25.4, foot: 304.8, meter: 1000 } as const;
export type Unit = keyof typeof UNIT_MM;
