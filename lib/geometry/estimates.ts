import { MATERIALS, type SlabOptions } from "./options";

export type Estimates = {
  material: string;
  /** mm³ */
  slabVolume: number;
  piecesVolume: number;
  /** grams */
  slabMass: number;
  piecesMass: number;
  totalMass: number;
  /** metres of 1.75 mm filament */
  filamentLength: number;
  /** in the workspace's currency */
  cost: number;
  pieces: { number: number; volume: number; mass: number }[];
};

/** Filament diameter, mm: 1.75 is the common size (common practice; 2.85 is also sold). */
export const FILAMENT_DIAMETER = 1.75;

/**
 * Solid-model estimates: mass = volume × density (datasheet densities, see options.ts), filament length
 * = volume ÷ the filament's cross-section π(d/2)², cost = mass × price per kg. A slicer's infill and
 * walls change the real figures; these are for the solid parts as modelled.
 */
export function estimate(o: SlabOptions, slabVolume: number, pieces: { number: number; volume: number }[]): Estimates {
  const density = MATERIALS[o.material].density; // g/cm³
  const g = (mm3: number) => (mm3 / 1000) * density;
  const piecesVolume = pieces.reduce((s, p) => s + p.volume, 0);
  const total = slabVolume + piecesVolume;
  const area = Math.PI * (FILAMENT_DIAMETER / 2) ** 2;
  return {
    material: o.material,
    slabVolume,
    piecesVolume,
    slabMass: g(slabVolume),
    piecesMass: g(piecesVolume),
    totalMass: g(total),
    filamentLength: total / area / 1000,
    cost: (g(total) / 1000) * o.pricePerKg,
    pieces: pieces.map((p) => ({ number: p.number, volume: p.volume, mass: g(p.volume) })),
  };
}
