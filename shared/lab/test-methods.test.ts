import { describe, expect, it } from 'vitest';
import { cautionDeferral } from './cautions';
import { isPhysicallyPossible, methodCautions, resultFromEntry, testMethodCodes, testMethods } from './test-methods';

describe('test method catalogue', () => {
  it('has one entry per code, each citing a standard or saying common practice', () => {
    expect(testMethods.map((m) => m.code)).toEqual([...testMethodCodes]);
    for (const m of testMethods) expect(m.standard).toMatch(/^EN \d|common practice/);
  });

  it('offers raw-load entry exactly for flexural, compressive and pull-off methods', () => {
    const withLoads = testMethods.filter((m) => m.rawLoad).map((m) => m.code);
    expect(withLoads).toEqual(['RF', 'RC', 'ADH', 'OTADH']);
  });
});

// Physical ranges (common practice; no standard states them): strengths 0 ≤ x < 200 MPa,
// air 0–100 %, flow 0–500 mm, density 500–3000 kg/m³, flow time 0–600 s, setting 0–1440 min, adhesion 0–10 MPa.
describe('isPhysicallyPossible', () => {
  it('keeps strengths below 200 MPa', () => {
    expect(isPhysicallyPossible('RC', 199.9)).toBe(true);
    expect(isPhysicallyPossible('RC', 200)).toBe(false);
    expect(isPhysicallyPossible('RF', -0.1)).toBe(false);
  });

  it('applies inclusive bounds elsewhere', () => {
    expect(isPhysicallyPossible('AIR', 100)).toBe(true);
    expect(isPhysicallyPossible('AIR', 100.1)).toBe(false);
    expect(isPhysicallyPossible('DENS', 499)).toBe(false);
    expect(isPhysicallyPossible('DENS', 500)).toBe(true);
    expect(isPhysicallyPossible('FLOW', 500)).toBe(true);
    expect(isPhysicallyPossible('FLOWTIME', 601)).toBe(false);
    expect(isPhysicallyPossible('SET', 1440)).toBe(true);
    expect(isPhysicallyPossible('ADH', 10.01)).toBe(false);
    expect(isPhysicallyPossible('FLOW', Number.NaN)).toBe(false);
  });
});

describe('resultFromEntry', () => {
  it('converts raw loads with the EN 196-1 / EN 13892-8 formulas', () => {
    // 40 kN / 1600 mm² = 25.0 MPa; 1.5 · 3200 N · 100 / 40³ = 7.5 MPa; 3750 N / 2500 mm² = 1.5 MPa.
    expect(resultFromEntry('RC', { value: 40, unit: 'kN' })).toBeCloseTo(25, 12);
    expect(resultFromEntry('RF', { value: 3.2, unit: 'kN' })).toBeCloseTo(7.5, 12);
    expect(resultFromEntry('ADH', { value: 3750, unit: 'N', pullHead: { shape: 'square', sideMm: 50 } })).toBeCloseTo(1.5, 12);
  });

  it('passes finished results through', () => {
    expect(resultFromEntry('FLOW', { value: 146, unit: 'result' })).toBe(146);
  });

  it('refuses a load where the method takes no load, and a pull-off load without its head', () => {
    expect(() => resultFromEntry('FLOW', { value: 1, unit: 'kN' })).toThrow(RangeError);
    expect(() => resultFromEntry('ADH', { value: 3.75, unit: 'kN' })).toThrow(/pull head/);
  });
});

describe('method cautions', () => {
  it('warn about alkaline material on every method and end with the deferral to SDS, standard and local rules', () => {
    for (const m of testMethods) {
      const texts = methodCautions(m.code);
      expect(texts.at(-1)).toBe(cautionDeferral);
      expect(texts.some((t) => /alkaline/i.test(t))).toBe(true);
    }
  });

  it('name the press guard for strength tests and dust protection for fresh tests', () => {
    expect(methodCautions('RC').join(' ')).toMatch(/press guard/);
    expect(methodCautions('FLOW').join(' ')).toMatch(/dust extraction|dust mask/);
  });
});
