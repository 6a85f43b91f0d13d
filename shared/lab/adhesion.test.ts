import { describe, expect, it } from 'vitest';
import { pullHeadAreaMm2, pullOffStrength, roundHead50, squareHead50 } from './adhesion';

// Tensile adhesion strength = force / test area (EN 13892-8; EN 12004-2 uses 50 × 50 mm tiles).
describe('pullOffStrength', () => {
  it('divides by 2500 mm² for the 50 × 50 mm square head', () => {
    // By hand: 3750 N / 2500 mm² = 1.50 MPa.
    expect(pullHeadAreaMm2(squareHead50)).toBe(2500);
    expect(pullOffStrength({ value: 3.75, unit: 'kN' }, squareHead50)).toBeCloseTo(1.5, 12);
  });

  it('divides by π · d² / 4 for the Ø 50 mm round head', () => {
    // By hand: π · 50² / 4 = 1963.495 mm²; 1500 N / 1963.495 mm² = 0.76394 MPa.
    expect(pullHeadAreaMm2(roundHead50)).toBeCloseTo(1963.495, 3);
    expect(pullOffStrength({ value: 1500, unit: 'N' }, roundHead50)).toBeCloseTo(0.76394, 5);
  });

  it('refuses a head without a size', () => {
    expect(() => pullHeadAreaMm2({ shape: 'round', diameterMm: 0 })).toThrow(RangeError);
  });
});
