// Capability indices against their ISO 22514-2 definitions, a worked example, and jstat for the
// normal and chi-square quantiles behind the intervals and the expected ppm.
import { createRequire } from 'node:module';
import { sampleStandardDeviation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { computeCapability } from './capability';
import { SpcInputError } from './errors';

const jStat = createRequire(import.meta.url)('jstat') as {
  normal: { cdf(x: number, m: number, s: number): number; inv(p: number, m: number, s: number): number };
  chisquare: { inv(p: number, df: number): number };
};

/** n values with exactly the given mean and sample standard deviation (a symmetric spread). */
function sampleWith(meanValue: number, sd: number, n: number): number[] {
  const raw = Array.from({ length: n }, (_, i) => jStat.normal.inv((i + 0.5) / n, 0, 1));
  const s = sampleStandardDeviation(raw);
  return raw.map((z) => meanValue + (z / s) * sd);
}

describe('worked example', () => {
  // NIST/SEMATECH e-Handbook §6.1.6 (process capability), example with USL = 20, LSL = 8, mean 16 and
  // standard deviation 2: Cp = 1.0, Cpk = 0.667 (from memory; both follow from the definitions).
  const values = sampleWith(16, 2, 200);
  const cap = computeCapability({ values, sigmaWithin: 2, lsl: 8, usl: 20 });
  it('Cp = (USL − LSL)/6σ and Cpk = min(Cpu, Cpl)', () => {
    expect(cap.cp).toBeCloseTo(1, 12);
    expect(cap.cpu).toBeCloseTo(0.6667, 4);
    expect(cap.cpl).toBeCloseTo(1.3333, 4);
    expect(cap.cpk).toBeCloseTo(0.6667, 4);
    expect(cap.pp).toBeCloseTo(1, 10);
    expect(cap.ppk).toBeCloseTo(0.6667, 4);
  });
  it('95 % interval of Cp from the chi-square quantiles (jstat)', () => {
    const df = 199;
    expect(cap.cpCi95?.[0]).toBeCloseTo(Math.sqrt(jStat.chisquare.inv(0.025, df) / df), 8);
    expect(cap.cpCi95?.[1]).toBeCloseTo(Math.sqrt(jStat.chisquare.inv(0.975, df) / df), 8);
  });
  it("95 % interval of Cpk by Bissell's approximation (Applied Statistics 39, 1990)", () => {
    const z = jStat.normal.inv(0.975, 0, 1);
    const k = cap.cpk as number;
    const half = z * Math.sqrt(1 / (9 * 200) + (k * k) / (2 * 199));
    expect(cap.cpkCi95?.[0]).toBeCloseTo(k - half, 8);
    expect(cap.cpkCi95?.[1]).toBeCloseTo(k + half, 8);
  });
  it('expected ppm from the normal model (jstat) and observed ppm from the data', () => {
    const expected = 1e6 * (jStat.normal.cdf(8, 16, 2) + 1 - jStat.normal.cdf(20, 16, 2));
    expect(cap.ppmExpected).toBeCloseTo(expected, 2);
    expect(cap.ppmExpectedWithin).toBeCloseTo(expected, 2);
    const outside = values.filter((v) => v < 8 || v > 20).length;
    expect(cap.ppmObserved).toBe((outside / 200) * 1e6);
    expect(cap.preliminary).toBe(false);
    expect(cap.notes).toEqual([]);
  });
});

describe('one-sided and target-based specifications', () => {
  const values = sampleWith(32, 1.5, 150);
  it('a lower limit alone gives Cpl and Ppl as Cpk and Ppk and no Cp (strength)', () => {
    const cap = computeCapability({ values, sigmaWithin: 1.4, lsl: 28 });
    expect(cap.cp).toBeNull();
    expect(cap.pp).toBeNull();
    expect(cap.cpu).toBeNull();
    expect(cap.cpl).toBeCloseTo((32 - 28) / (3 * 1.4), 10);
    expect(cap.cpk).toBe(cap.cpl);
    expect(cap.ppk).toBeCloseTo((32 - 28) / 4.5, 10);
    expect(cap.cpCi95).toBeNull();
    expect(cap.cpkCi95).not.toBeNull();
    expect(cap.ppmExpected).toBeCloseTo(1e6 * jStat.normal.cdf(28, 32, 1.5), 4);
    expect(cap.notes.map((n) => n.code)).toEqual(['one-sided']);
  });
  it('an upper limit alone', () => {
    const cap = computeCapability({ values, sigmaWithin: 1.4, usl: 35 });
    expect(cap.cpk).toBeCloseTo((35 - 32) / 4.2, 10);
    expect(cap.ppmExpected).toBeCloseTo(1e6 * (1 - jStat.normal.cdf(35, 32, 1.5)), 4);
  });
  it('Cpm with a target: (USL − LSL)/(6·√(s² + (mean − T)²))', () => {
    const cap = computeCapability({ values, sigmaWithin: 1.4, lsl: 27, usl: 39, target: 33 });
    expect(cap.cpm).toBeCloseTo(12 / (6 * Math.sqrt(1.5 ** 2 + 1)), 10);
  });
});

describe('cautions and degenerate input', () => {
  it('marks fewer than 25 subgroups or 100 values as preliminary', () => {
    const few = computeCapability({ values: sampleWith(10, 1, 60), sigmaWithin: 1, lsl: 7, usl: 13, subgroupCount: 20 });
    expect(few.preliminary).toBe(true);
    expect(few.notes.map((n) => n.code)).toContain('preliminary');
    expect(computeCapability({ values: sampleWith(10, 1, 100), sigmaWithin: 1, lsl: 7, subgroupCount: 25 }).preliminary).toBe(false);
    expect(computeCapability({ values: sampleWith(10, 1, 99), sigmaWithin: 1, lsl: 7, subgroupCount: 33 }).preliminary).toBe(true);
  });
  it('warns in plain words when the data are not normal', () => {
    // Exponential values: far from normal.
    const skewed = Array.from({ length: 200 }, (_, i) => -Math.log(1 - (i + 0.5) / 200));
    const cap = computeCapability({ values: skewed, sigmaWithin: 1, usl: 5 });
    expect(cap.normality?.p).toBeLessThan(0.001);
    const note = cap.notes.find((n) => n.code === 'not-normal');
    expect(note?.message).toMatch(/not look normally distributed/);
    // A bound reads "p < 0.001", never "p = < 0.001".
    expect(note?.message).toContain('(Anderson–Darling p < 0.001)');
  });
  it('no specification: indices null with a reason', () => {
    const cap = computeCapability({ values: [1, 2, 3], sigmaWithin: 1 });
    expect(cap.cpk).toBeNull();
    expect(cap.ppmObserved).toBeNull();
    expect(cap.notes.map((n) => n.code)).toContain('no-spec');
  });
  it('limits in the wrong order', () => {
    const cap = computeCapability({ values: [1, 2, 3], sigmaWithin: 1, lsl: 5, usl: 4 });
    expect(cap.cp).toBeNull();
    expect(cap.notes.map((n) => n.code)).toContain('spec-order');
  });
  it('all values equal: no infinite indices, ppm still defined', () => {
    const cap = computeCapability({ values: [5, 5, 5, 5, 5, 5, 5, 5], sigmaWithin: 0, lsl: 4, usl: 6 });
    expect(cap.cp).toBeNull();
    expect(cap.ppk).toBeNull();
    expect(cap.ppmExpected).toBe(0);
    expect(cap.ppmObserved).toBe(0);
    expect(cap.normality?.p).toBeNull();
    expect(cap.notes.map((n) => n.code)).toEqual(expect.arrayContaining(['no-variation', 'normality-unknown']));
    expect(JSON.stringify(cap)).not.toMatch(/NaN|Infinity/);
  });
  it('a single value and no values', () => {
    const one = computeCapability({ values: [5], sigmaWithin: null, lsl: 4 });
    expect(one.pp).toBeNull();
    expect(one.cpk).toBeNull();
    expect(one.ppmObserved).toBe(0);
    const none = computeCapability({ values: [], sigmaWithin: null, lsl: 4 });
    expect(none.mean).toBeNull();
    expect(none.notes.map((n) => n.code)).toContain('no-data');
  });
  it('a value on a specification limit is inside it', () => {
    expect(computeCapability({ values: [4, 5, 6], sigmaWithin: 1, lsl: 4, usl: 6, normality: false }).ppmObserved).toBe(0);
  });
  it('programming errors throw', () => {
    expect(() => computeCapability({ values: [1, Number.NaN], sigmaWithin: 1, lsl: 0 })).toThrow(SpcInputError);
    expect(() => computeCapability({ values: [1, 2], sigmaWithin: 1, lsl: Number.NaN })).toThrow(SpcInputError);
  });
});
