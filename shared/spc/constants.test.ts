// Control chart constants against a published table and closed forms.
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { A2, A3, B3, B4, c4, d2, d3, D3, D4, E2 } from './constants';

const jStat = createRequire(import.meta.url)('jstat') as { gammafn(x: number): number };

// Factors for control charts for variables, n = 2–25, three decimals, as tabulated in ASTM E2587
// ("Standard Practice for Use of Control Charts in Statistical Process Control", table of control chart
// constants) and the appendix tables of quality-control textbooks. Values written from memory of that
// table; c4 carries the table's four decimals.
// n: [d2, d3, c4, A2, A3, B3, B4, D3, D4]
const TABLE: Record<number, number[]> = {
  2: [1.128, 0.853, 0.7979, 1.88, 2.659, 0, 3.267, 0, 3.267],
  3: [1.693, 0.888, 0.8862, 1.023, 1.954, 0, 2.568, 0, 2.574],
  4: [2.059, 0.88, 0.9213, 0.729, 1.628, 0, 2.266, 0, 2.282],
  5: [2.326, 0.864, 0.94, 0.577, 1.427, 0, 2.089, 0, 2.114],
  6: [2.534, 0.848, 0.9515, 0.483, 1.287, 0.03, 1.97, 0, 2.004],
  7: [2.704, 0.833, 0.9594, 0.419, 1.182, 0.118, 1.882, 0.076, 1.924],
  8: [2.847, 0.82, 0.965, 0.373, 1.099, 0.185, 1.815, 0.136, 1.864],
  9: [2.97, 0.808, 0.9693, 0.337, 1.032, 0.239, 1.761, 0.184, 1.816],
  10: [3.078, 0.797, 0.9727, 0.308, 0.975, 0.284, 1.716, 0.223, 1.777],
  11: [3.173, 0.787, 0.9754, 0.285, 0.927, 0.321, 1.679, 0.256, 1.744],
  12: [3.258, 0.778, 0.9776, 0.266, 0.886, 0.354, 1.646, 0.283, 1.717],
  13: [3.336, 0.77, 0.9794, 0.249, 0.85, 0.382, 1.618, 0.307, 1.693],
  14: [3.407, 0.763, 0.981, 0.235, 0.817, 0.406, 1.594, 0.328, 1.672],
  15: [3.472, 0.756, 0.9823, 0.223, 0.789, 0.428, 1.572, 0.347, 1.653],
  16: [3.532, 0.75, 0.9835, 0.212, 0.763, 0.448, 1.552, 0.363, 1.637],
  17: [3.588, 0.744, 0.9845, 0.203, 0.739, 0.466, 1.534, 0.378, 1.622],
  18: [3.64, 0.739, 0.9854, 0.194, 0.718, 0.482, 1.518, 0.391, 1.608],
  19: [3.689, 0.733, 0.9862, 0.187, 0.698, 0.497, 1.503, 0.403, 1.597],
  20: [3.735, 0.729, 0.9869, 0.18, 0.68, 0.51, 1.49, 0.415, 1.585],
  21: [3.778, 0.724, 0.9876, 0.173, 0.663, 0.523, 1.477, 0.425, 1.575],
  22: [3.819, 0.72, 0.9882, 0.167, 0.647, 0.534, 1.466, 0.434, 1.566],
  23: [3.858, 0.716, 0.9887, 0.162, 0.633, 0.545, 1.455, 0.443, 1.557],
  24: [3.895, 0.712, 0.9892, 0.157, 0.619, 0.555, 1.445, 0.451, 1.548],
  25: [3.931, 0.708, 0.9896, 0.153, 0.606, 0.565, 1.435, 0.459, 1.541],
};

describe('control chart constants against the ASTM E2587 table', () => {
  for (const [key, row] of Object.entries(TABLE)) {
    const n = Number(key);
    it(`n = ${n}`, () => {
      const [td2, td3, tc4, tA2, tA3, tB3, tB4, tD3, tD4] = row;
      // d2, d3 and c4 to the table's rounding (half a unit of its last decimal).
      expect(Math.abs(d2(n) - td2)).toBeLessThanOrEqual(0.0005 + 1e-9);
      expect(Math.abs(d3(n) - td3)).toBeLessThanOrEqual(0.0005 + 1e-9);
      expect(Math.abs(c4(n) - tc4)).toBeLessThanOrEqual(0.00005 + 1e-9);
      // The derived factors were tabulated from rounded d2, d3 and c4, which can move the third
      // decimal by one unit.
      for (const [mine, theirs] of [[A2(n), tA2], [A3(n), tA3], [B3(n), tB3], [B4(n), tB4], [D3(n), tD3], [D4(n), tD4]]) {
        expect(Math.abs(mine - theirs)).toBeLessThanOrEqual(0.0015);
      }
    });
  }
});

describe('closed forms', () => {
  // The range of two standard normal values is |X1 − X2|, half-normal with scale √2; for three the
  // expected range is 3/√π (classical results for the range of normal samples).
  it('n = 2 and n = 3', () => {
    expect(d2(2)).toBeCloseTo(2 / Math.sqrt(Math.PI), 12);
    expect(d3(2)).toBeCloseTo(Math.sqrt(2 - 4 / Math.PI), 12);
    expect(d2(3)).toBeCloseTo(3 / Math.sqrt(Math.PI), 12);
    expect(c4(2)).toBeCloseTo(Math.sqrt(2 / Math.PI), 14);
    expect(c4(3)).toBeCloseTo(Math.sqrt(Math.PI) / 2, 14);
    // The individuals chart factor: 3 / 1.128 = 2.66 (common practice).
    expect(E2()).toBeCloseTo(2.66, 2);
  });
  it('c4 agrees with the gamma function of jstat', () => {
    for (const n of [2, 5, 10, 25, 60]) {
      const ref = Math.sqrt(2 / (n - 1)) * (jStat.gammafn(n / 2) / jStat.gammafn((n - 1) / 2));
      expect(c4(n)).toBeCloseTo(ref, 8); // jstat's gamma function carries about nine digits
    }
  });
  it('d2 and d3 agree with a simulation of normal ranges', () => {
    // Seeded simulation, 200,000 subgroups of 5: the mean and standard deviation of the range.
    let state = 12345;
    const uniform = () => {
      state = (Math.imul(state, 1103515245) + 12345) >>> 0;
      return (state + 0.5) / 4294967296;
    };
    const k = 200_000;
    let sum = 0;
    let sq = 0;
    for (let g = 0; g < k; g++) {
      let lo = Infinity;
      let hi = -Infinity;
      for (let j = 0; j < 5; j++) {
        const z = Math.sqrt(-2 * Math.log(uniform())) * Math.cos(2 * Math.PI * uniform());
        lo = Math.min(lo, z);
        hi = Math.max(hi, z);
      }
      sum += hi - lo;
      sq += (hi - lo) ** 2;
    }
    const mean = sum / k;
    const sd = Math.sqrt(sq / k - mean * mean);
    // Four standard errors: 4·0.864/√200000 ≈ 0.008.
    expect(Math.abs(mean - d2(5))).toBeLessThan(0.008);
    expect(Math.abs(sd - d3(5))).toBeLessThan(0.008);
  });
  it('grows sensibly past the table and rejects impossible sizes', () => {
    expect(d2(50)).toBeGreaterThan(d2(25));
    expect(c4(100)).toBeGreaterThan(c4(25));
    expect(c4(100)).toBeLessThan(1);
    expect(() => d2(1)).toThrow(RangeError);
    expect(() => c4(2.5)).toThrow(RangeError);
  });
});
