import { type ForceReading, toNewtons } from './units';

/**
 * Prism geometry of EN 196-1, which EN 13892-2 uses for screed materials: 40 × 40 × 160 mm
 * prisms broken in three-point bending over a 100 mm span, the halves then crushed between
 * 40 × 40 mm platens.
 */
export const standardPrism = {
  sideMm: 40,
  spanMm: 100,
  platenAreaMm2: 40 * 40,
} as const;

export interface BendingGeometry {
  /** Distance between the support rollers, l (mm). */
  spanMm: number;
  /** Side of the square prism section, b (mm). */
  sideMm: number;
}

/**
 * Flexural strength Rf = 1.5 · Ff · l / b³ in MPa (EN 196-1, EN 13892-2).
 * With the standard prism this is Rf = 0.00234375 · Ff[N].
 */
export function flexuralStrength(
  breakingLoad: ForceReading,
  geometry: BendingGeometry = standardPrism,
): number {
  const ff = toNewtons(breakingLoad);
  const { spanMm, sideMm } = geometry;
  if (!(spanMm > 0) || !(sideMm > 0)) throw new RangeError('Span and prism side must be > 0 mm');
  return (1.5 * ff * spanMm) / sideMm ** 3;
}

/** Compressive strength Rc = Fc / A in MPa; A = 1600 mm² for the 40 × 40 mm platens of EN 196-1. */
export function compressiveStrength(
  breakingLoad: ForceReading,
  platenAreaMm2: number = standardPrism.platenAreaMm2,
): number {
  const fc = toNewtons(breakingLoad);
  if (!(platenAreaMm2 > 0)) throw new RangeError('Platen area must be > 0 mm²');
  return fc / platenAreaMm2;
}

/**
 * Ratio of compressive to flexural strength at the same age. Common practice watches it as an
 * indicator of cracking tendency: a lower ratio means a tougher, less crack-prone compound.
 */
export function compressiveToFlexuralRatio(compressiveMPa: number, flexuralMPa: number): number {
  if (!Number.isFinite(compressiveMPa) || compressiveMPa < 0) {
    throw new RangeError('Compressive strength must be a number ≥ 0');
  }
  if (!Number.isFinite(flexuralMPa) || flexuralMPa <= 0) {
    throw new RangeError('Flexural strength must be > 0 to form a ratio');
  }
  return compressiveMPa / flexuralMPa;
}
