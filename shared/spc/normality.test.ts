// Anderson–Darling test: the p-value approximation against the published critical values, the
// statistic against a direct evaluation with jstat's normal distribution, and its power.
import { createRequire } from 'node:module';
import { mean, sampleStandardDeviation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { andersonDarling, andersonDarlingPValue } from './normality';

const jStat = createRequire(import.meta.url)('jstat') as {
  normal: { cdf(x: number, m: number, s: number): number; inv(p: number, m: number, s: number): number };
};

describe('p-value', () => {
  it('reproduces the critical values of the adjusted statistic for estimated mean and variance', () => {
    // Stephens (1974), as tabulated in D'Agostino & Stephens (1986), Table 4.7 (from memory):
    // A*² = 0.631, 0.752, 0.873, 1.035 at significance 10 %, 5 %, 2.5 %, 1 %.
    expect(andersonDarlingPValue(0.631)).toBeCloseTo(0.1, 2);
    expect(andersonDarlingPValue(0.752)).toBeCloseTo(0.05, 2);
    expect(andersonDarlingPValue(0.873)).toBeCloseTo(0.025, 2);
    expect(andersonDarlingPValue(1.035)).toBeCloseTo(0.01, 3);
  });
  it('falls as the statistic grows and stays within 0 and 1', () => {
    let last = 1;
    for (let a = 0; a < 400; a += 0.25) {
      const p = andersonDarlingPValue(a);
      expect(p).toBeLessThanOrEqual(last + 1e-3); // the four pieces join with small steps
      expect(p).toBeGreaterThanOrEqual(0);
      last = p;
    }
    expect(andersonDarlingPValue(1000)).toBe(0);
  });
});

describe('statistic', () => {
  it('agrees with a direct evaluation of A² using jstat', () => {
    const x = [31.2, 29.8, 30.5, 32.1, 30.9, 31.7, 29.5, 30.2, 33.0, 30.8, 31.4, 30.0];
    const sorted = [...x].sort((a, b) => a - b);
    const m = mean(x);
    const s = sampleStandardDeviation(x);
    const n = x.length;
    let sum = 0;
    for (let i = 1; i <= n; i++) {
      sum += (2 * i - 1) * (Math.log(jStat.normal.cdf(sorted[i - 1], m, s)) + Math.log(1 - jStat.normal.cdf(sorted[n - i], m, s)));
    }
    const a2 = -n - sum / n;
    const result = andersonDarling(x);
    expect(result.statistic).toBeCloseTo(a2, 10);
    expect(result.adjusted).toBeCloseTo(a2 * (1 + 0.75 / n + 2.25 / (n * n)), 10);
    expect(result.p).toBeCloseTo(andersonDarlingPValue(result.adjusted as number), 12);
    expect(x[0]).toBe(31.2); // the input is not sorted in place
  });
  it('accepts normal data and rejects uniform and skewed data', () => {
    const normal = Array.from({ length: 300 }, (_, i) => jStat.normal.inv((i + 0.5) / 300, 30, 2));
    expect(andersonDarling(normal).p).toBeGreaterThan(0.5);
    const uniform = Array.from({ length: 300 }, (_, i) => i / 299);
    expect(andersonDarling(uniform).p).toBeLessThan(0.01);
    const skewed = Array.from({ length: 100 }, (_, i) => Math.exp((i / 99) * 3));
    expect(andersonDarling(skewed).p).toBeLessThan(0.01);
  });
  it('stays finite with an extreme outlier', () => {
    const x = Array.from({ length: 5000 }, (_, i) => jStat.normal.inv((i + 0.5) / 5000, 0, 1));
    x[17] = 1e6;
    const r = andersonDarling(x);
    expect(Number.isFinite(r.statistic)).toBe(true);
    expect(r.p).toBe(0);
  });
  it('gives no p-value, with a reason, for too few or identical values', () => {
    const few = andersonDarling([1, 2, 3, 4, 5, 6, 7]);
    expect(few.p).toBeNull();
    expect(few.reason).toMatch(/at least 8/);
    expect(andersonDarling([2, 2, 2, 2, 2, 2, 2, 2, 2]).reason).toMatch(/equal/);
  });
});
