import { describe, expect, it } from 'vitest';
import { compressiveStrength, compressiveToFlexuralRatio, flexuralStrength, standardPrism } from './strength';

describe('flexuralStrength', () => {
  it('applies Rf = 1.5 · Ff · l / b³ with l = 100 mm, b = 40 mm (EN 196-1, EN 13892-2)', () => {
    // By hand: 1.5 · 3200 N · 100 mm / (40 mm)³ = 480 000 / 64 000 = 7.5 N/mm² = 7.5 MPa.
    expect(flexuralStrength({ value: 3.2, unit: 'kN' })).toBeCloseTo(7.5, 12);
    // By hand: 1.5 · 2500 · 100 / 64 000 = 375 000 / 64 000 = 5.859375 MPa.
    expect(flexuralStrength({ value: 2500, unit: 'N' })).toBeCloseTo(5.859375, 12);
  });

  it('agrees with the three-point bending stress of beam theory, σ = M / W', () => {
    // Mechanics-of-materials handbook formula: midspan moment M = F·l/4, section modulus of a
    // square section W = b³/6, so σ = (F·l/4)/(b³/6). For F = 1840 N: 46 000 / 10 666.67 = 4.3125 MPa.
    const f = 1840;
    const sigma = (f * standardPrism.spanMm) / 4 / (standardPrism.sideMm ** 3 / 6);
    expect(flexuralStrength({ value: f, unit: 'N' })).toBeCloseTo(sigma, 12);
    expect(sigma).toBeCloseTo(4.3125, 12);
  });

  it('takes a non-standard span and section', () => {
    // 1.5 · 1000 N · 120 mm / (50 mm)³ = 180 000 / 125 000 = 1.44 MPa.
    expect(flexuralStrength({ value: 1, unit: 'kN' }, { spanMm: 120, sideMm: 50 })).toBeCloseTo(1.44, 12);
  });

  it('refuses negative or missing loads', () => {
    expect(() => flexuralStrength({ value: -1, unit: 'kN' })).toThrow(RangeError);
    expect(() => flexuralStrength({ value: Number.NaN, unit: 'N' })).toThrow(RangeError);
  });
});

describe('compressiveStrength', () => {
  it('divides the load by the 40 × 40 mm platen area, Rc = Fc / 1600 mm² (EN 196-1)', () => {
    // By hand: 40 000 N / 1600 mm² = 25.0 MPa; 50 400 N / 1600 mm² = 31.5 MPa.
    expect(compressiveStrength({ value: 40, unit: 'kN' })).toBeCloseTo(25, 12);
    expect(compressiveStrength({ value: 50_400, unit: 'N' })).toBeCloseTo(31.5, 12);
  });

  it('treats kN and N the same after conversion', () => {
    expect(compressiveStrength({ value: 12.8, unit: 'kN' })).toBeCloseTo(compressiveStrength({ value: 12_800, unit: 'N' }), 12);
  });
});

describe('compressiveToFlexuralRatio', () => {
  it('is Rc / Rf (common practice indicator of cracking tendency)', () => {
    // 30.0 MPa / 7.5 MPa = 4.0.
    expect(compressiveToFlexuralRatio(30, 7.5)).toBeCloseTo(4, 12);
  });

  it('refuses a zero flexural strength', () => {
    expect(() => compressiveToFlexuralRatio(30, 0)).toThrow(RangeError);
  });
});
