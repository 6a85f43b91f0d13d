/** Force units a testing machine or pull-off gauge displays. */
export const forceUnits = ['N', 'kN'] as const;
export type ForceUnit = (typeof forceUnits)[number];

/** A force reading as the technician wrote it down. */
export interface ForceReading {
  value: number;
  unit: ForceUnit;
}

/**
 * A force in newtons. Stresses are then N/mm², which is the same number as MPa,
 * so no further factor appears in the strength formulas.
 */
export function toNewtons(reading: ForceReading): number {
  const { value, unit } = reading;
  if (!Number.isFinite(value) || value < 0) {
    throw new RangeError(`A breaking load must be a number ≥ 0, got ${value} ${unit}`);
  }
  return unit === 'kN' ? value * 1000 : value;
}
