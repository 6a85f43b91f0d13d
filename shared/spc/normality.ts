// Anderson–Darling test of normality with the mean and standard deviation estimated from the data
// (case 4 of D'Agostino & Stephens, "Goodness-of-Fit Techniques", 1986, §4.8): the statistic A², its
// small-sample adjustment A*² = A²·(1 + 0.75/n + 2.25/n²), and the p-value from their piecewise
// exponential approximation (Table 4.9).
import { normalUpperTail } from './distributions';

/** Below this many values the p-value approximation is not trusted (common practice). */
export const NORMALITY_MIN_VALUES = 8;

export interface NormalityResult {
  test: 'anderson-darling';
  n: number;
  /** A²; null when it cannot be computed. */
  statistic: number | null;
  /** A*², the statistic with the small-sample adjustment the p-value is read from. */
  adjusted: number | null;
  p: number | null;
  /** Why the test gave no p-value. */
  reason: string | null;
}

/** p-value of the adjusted statistic A*² (D'Agostino & Stephens 1986, Table 4.9). */
export function andersonDarlingPValue(adjusted: number): number {
  const a = adjusted;
  let p: number;
  if (a >= 0.6) {
    // Past the turning point of the quadratic the formula would rise again; p is below 1e-180 there.
    p = a >= 153 ? 0 : Math.exp(1.2937 - 5.709 * a + 0.0186 * a * a);
  } else if (a >= 0.34) p = Math.exp(0.9177 - 4.279 * a - 1.38 * a * a);
  else if (a >= 0.2) p = 1 - Math.exp(-8.318 + 42.796 * a - 59.938 * a * a);
  else p = 1 - Math.exp(-13.436 + 101.14 * a - 223.73 * a * a);
  return Math.min(1, Math.max(0, p));
}

/** Anderson–Darling normality test. Sorts a copy of the values; the input is left untouched. */
export function andersonDarling(values: ArrayLike<number>): NormalityResult {
  const n = values.length;
  const none = (reason: string): NormalityResult => ({ test: 'anderson-darling', n, statistic: null, adjusted: null, p: null, reason });
  if (n < NORMALITY_MIN_VALUES) return none(`The normality test needs at least ${NORMALITY_MIN_VALUES} values; there are ${n}.`);
  const sorted = values instanceof Float64Array ? values.slice() : Float64Array.from(values);
  sorted.sort();
  let sum = 0;
  for (let i = 0; i < n; i++) sum += sorted[i];
  const mean = sum / n;
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const e = sorted[i] - mean;
    ss += e * e;
  }
  const sd = Math.sqrt(ss / (n - 1));
  if (!(sd > 0) || !Number.isFinite(sd)) return none('All values are equal, so normality cannot be judged.');
  // A² = −n − (1/n)·Σ (2i − 1)·[ln Φ(zᵢ) + ln(1 − Φ(z₍ₙ₊₁₋ᵢ₎))]. Each sorted value enters once as
  // zᵢ and once as z₍ₙ₊₁₋ᵢ₎, so one pass with both tails of Φ at each value covers the sum.
  // Tails are floored at the smallest double so that a value beyond 38σ gives a huge but finite term.
  let s = 0;
  for (let j = 0; j < n; j++) {
    const z = (sorted[j] - mean) / sd;
    const tail = Math.max(normalUpperTail(z < 0 ? -z : z), Number.MIN_VALUE);
    const body = 1 - tail;
    const lower = z < 0 ? tail : body;
    const upper = z < 0 ? body : tail;
    s += (2 * j + 1) * Math.log(lower) + (2 * (n - j) - 1) * Math.log(upper);
  }
  const a2 = -n - s / n;
  const adjusted = a2 * (1 + 0.75 / n + 2.25 / (n * n));
  return { test: 'anderson-darling', n, statistic: a2, adjusted, p: andersonDarlingPValue(adjusted), reason: null };
}
