// Distribution functions against jstat (a general-purpose statistics library) and textbook values.
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquareQuantile, lnGamma, normalCdf, normalQuantile } from './distributions';

const jStat = createRequire(import.meta.url)('jstat') as {
  normal: { cdf(x: number, m: number, s: number): number; inv(p: number, m: number, s: number): number };
  chisquare: { cdf(x: number, df: number): number; inv(p: number, df: number): number };
  gammaln(x: number): number;
};

const relative = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe('normal distribution', () => {
  it('matches jstat over the range that matters', () => {
    // Below −6 jstat's lower tail loses relative precision (it is computed as 1 − erf).
    for (let x = -6; x <= 8; x += 0.25) expect(relative(normalCdf(x), jStat.normal.cdf(x, 0, 1))).toBeLessThan(1e-6);
  });
  it('keeps its relative precision far in the tails', () => {
    // Tail areas of the standard normal as printed in normal tables (values to many digits from memory).
    expect(relative(normalCdf(-3), 0.0013498980316300946)).toBeLessThan(1e-12);
    expect(relative(normalCdf(-6), 9.865876450376946e-10)).toBeLessThan(1e-12);
    expect(relative(1 - normalCdf(1.959963984540054), 0.025)).toBeLessThan(1e-12);
  });
  it('quantile inverts the distribution function and agrees with jstat', () => {
    for (const p of [1e-9, 0.001, 0.025, 0.3, 0.5, 0.8, 0.975, 0.999999]) {
      expect(normalQuantile(p)).toBeCloseTo(jStat.normal.inv(p, 0, 1), 8);
      expect(relative(normalCdf(normalQuantile(p)), p)).toBeLessThan(1e-12);
    }
    expect(normalQuantile(0.975)).toBeCloseTo(1.959964, 6);
  });
});

describe('chi-square distribution', () => {
  it('quantiles agree with jstat', () => {
    for (const df of [1, 2, 4, 9, 24, 99, 999, 99_999]) {
      for (const p of [0.025, 0.5, 0.975]) expect(relative(chiSquareQuantile(p, df), jStat.chisquare.inv(p, df))).toBeLessThan(1e-8);
    }
  });
  it('quantiles agree with a printed chi-square table', () => {
    // Upper and lower 2.5 % points for 10 and 24 degrees of freedom (standard table, from memory).
    expect(chiSquareQuantile(0.025, 10)).toBeCloseTo(3.247, 3);
    expect(chiSquareQuantile(0.975, 10)).toBeCloseTo(20.483, 3);
    expect(chiSquareQuantile(0.975, 24)).toBeCloseTo(39.364, 3);
  });
  it('distribution function agrees with jstat', () => {
    for (const [x, df] of [[0.5, 1], [3, 4], [20, 10], [110, 100]]) expect(chiSquareCdf(x, df)).toBeCloseTo(jStat.chisquare.cdf(x, df), 10);
  });
});

describe('log gamma', () => {
  it('agrees with jstat and the factorials', () => {
    expect(lnGamma(10)).toBeCloseTo(Math.log(362880), 12);
    expect(lnGamma(0.5)).toBeCloseTo(Math.log(Math.sqrt(Math.PI)), 12);
    for (const x of [0.3, 1.7, 12.5, 500]) expect(relative(lnGamma(x), jStat.gammaln(x))).toBeLessThan(1e-10);
  });
});
