import { describe, expect, it } from 'vitest';
import { evaluateCompressiveSet, evaluateFlexuralSet } from './strength-sets';

// The six-halves rule of EN 196-1 (wording from memory): one value beyond ±10 % of the
// mean of six is discarded and the other five averaged; a second one beyond ±10 % of the mean of
// those five rejects the set. All means and percentages below are worked by hand.
describe('evaluateCompressiveSet', () => {
  it('accepts a set whose six values all lie within ±10 %', () => {
    // Sum 181.0, mean 30.1667; the farthest value, 29.2, is 3.2 % away.
    const r = evaluateCompressiveSet([30.1, 29.5, 30.8, 31.0, 29.2, 30.4]);
    expect(r.status).toBe('accepted');
    expect(r.mean).toBeCloseTo(30.1667, 4);
    expect(r.discardedIndex).toBeNull();
  });

  it('discards one value beyond ±10 % and averages the other five', () => {
    // Mean of six = 186 / 6 = 31.0; 36 is 16.1 % above and goes; the five average 30.0.
    const r = evaluateCompressiveSet([30, 30, 30, 30, 30, 36]);
    expect(r.status).toBe('accepted-one-discarded');
    expect(r.discardedIndex).toBe(5);
    expect(r.mean).toBeCloseTo(30, 12);
    expect(r.reason).toMatch(/discarded/);
  });

  it('rejects the set when one of the remaining five is beyond ±10 % of their mean', () => {
    // Mean of six = 194 / 6 = 32.33: 40 is 23.7 % above (discarded), 34 only 5.2 % (kept).
    // Mean of five = 154 / 5 = 30.8: now 34 is 10.4 % above, so the set is rejected.
    const r = evaluateCompressiveSet([40, 34, 30, 30, 30, 30]);
    expect(r.status).toBe('rejected');
    expect(r.mean).toBeNull();
    expect(r.discardedIndex).toBe(0);
    expect(r.reason).toMatch(/rejected/);
  });

  it('rejects the set when two of the six are beyond ±10 %', () => {
    // Mean 182 / 6 = 30.33: 40 is 31.9 % above and 22 is 27.5 % below; only one may go.
    const r = evaluateCompressiveSet([40, 22, 30, 30, 30, 30]);
    expect(r.status).toBe('rejected');
    expect(r.mean).toBeNull();
  });

  it('keeps a value exactly 10 % from the mean of six ("more than ±10 %" discards)', () => {
    // Sum 180, mean 30.0; 33 is exactly +10 %.
    const r = evaluateCompressiveSet([33, 30, 30, 29, 29, 29]);
    expect(r.status).toBe('accepted');
    expect(r.mean).toBeCloseTo(30, 12);
  });

  it('discards a value just beyond 10 % from the mean of six', () => {
    // Sum 180.01, mean 30.0017; 33.01 is 10.03 % above and goes; the five average 147 / 5 = 29.4.
    const r = evaluateCompressiveSet([33.01, 30, 30, 29, 29, 29]);
    expect(r.status).toBe('accepted-one-discarded');
    expect(r.discardedIndex).toBe(0);
    expect(r.mean).toBeCloseTo(29.4, 12);
  });

  it('keeps a value exactly 10 % from the mean of the remaining five', () => {
    // Mean of six = 174 / 6 = 29.0: 24 is 17.2 % below (discarded), 27 is 6.9 % below (kept).
    // Mean of five = 150 / 5 = 30.0: 27 is now exactly −10 %, which is not more than 10 %.
    const r = evaluateCompressiveSet([24, 27, 30, 31, 31, 31]);
    expect(r.status).toBe('accepted-one-discarded');
    expect(r.discardedIndex).toBe(0);
    expect(r.mean).toBeCloseTo(30, 12);
  });

  it('needs exactly six non-negative values', () => {
    expect(() => evaluateCompressiveSet([30, 30, 30, 30, 30])).toThrow(RangeError);
    expect(() => evaluateCompressiveSet([30, 30, 30, 30, 30, -1])).toThrow(RangeError);
  });
});

describe('evaluateFlexuralSet', () => {
  it('is the mean of the three prisms (EN 196-1)', () => {
    // (7.2 + 7.6 + 7.5) / 3 = 22.3 / 3 = 7.4333.
    const r = evaluateFlexuralSet([7.2, 7.6, 7.5]);
    expect(r.status).toBe('accepted');
    expect(r.mean).toBeCloseTo(7.4333, 4);
  });

  it('discards nothing, even from a wide set (no flexural discard rule in EN 196-1, from memory)', () => {
    // (5.0 + 7.5 + 7.6) / 3 = 20.1 / 3 = 6.7.
    const r = evaluateFlexuralSet([5.0, 7.5, 7.6]);
    expect(r.status).toBe('accepted');
    expect(r.discardedIndex).toBeNull();
    expect(r.mean).toBeCloseTo(6.7, 12);
  });

  it('needs exactly three values', () => {
    expect(() => evaluateFlexuralSet([7.2, 7.6])).toThrow(RangeError);
  });
});
