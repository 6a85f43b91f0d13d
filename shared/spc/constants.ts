// Control chart constants computed from their definitions rather than copied from a table, so that
// every subgroup size the data bring (not only 2–25) gets the same treatment.
//
// d2(n) = E[R] and d3(n) = sd[R] for the range R of n independent standard normal values;
// c4(n) = E[S]/σ for the sample standard deviation S of n normal values.
// The factors derived from them are the usual three-sigma ones (A2, A3, B3, B4, D3, D4, E2).
import { lnGamma, normalCdf } from './distributions';

const STEP = 0.02;
const HALF_WIDTH = 9; // Φ(−9) ≈ 1e−19: the integrands vanish beyond ±9
const GRID = Math.round((2 * HALF_WIDTH) / STEP);
const RANGE_LIMIT = 14; // P(R > 14) is negligible for every n the engine accepts (n ≤ 10^4)

let phiGrid: Float64Array | undefined;
let pdfGrid: Float64Array | undefined;

function grids(): [Float64Array, Float64Array] {
  if (!phiGrid || !pdfGrid) {
    const extra = Math.round(RANGE_LIMIT / STEP);
    phiGrid = new Float64Array(GRID + 1 + extra);
    pdfGrid = new Float64Array(GRID + 1);
    for (let i = 0; i < phiGrid.length; i++) {
      const x = -HALF_WIDTH + i * STEP;
      phiGrid[i] = normalCdf(x);
      if (i <= GRID) pdfGrid[i] = Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI);
    }
  }
  return [phiGrid, pdfGrid];
}

function checkSize(n: number, largest = Infinity): void {
  if (!Number.isInteger(n) || n < 2 || n > largest) throw new RangeError(`subgroup size must be a whole number from 2${largest < Infinity ? ` to ${largest}` : ''}, got ${n}`);
}

const rangeMoments = new Map<number, { d2: number; d3: number }>();

function moments(n: number): { d2: number; d3: number } {
  checkSize(n, 10_000);
  const cached = rangeMoments.get(n);
  if (cached) return cached;
  const [phi, pdf] = grids();
  // E[R] = ∫ 1 − Φ(x)^n − (1 − Φ(x))^n dx. The trapezoid rule is exact to rounding here because the
  // integrand is smooth and decays like a normal density.
  let mean = 0;
  for (let i = 0; i <= GRID; i++) {
    const p = phi[i];
    mean += 1 - Math.pow(p, n) - Math.pow(1 - p, n);
  }
  mean *= STEP;
  // E[R²] = 2 ∫₀^∞ r·P(R > r) dr with P(R ≤ r) = n ∫ φ(x)·[Φ(x + r) − Φ(x)]^(n−1) dx
  // (the smallest value at x, the other n − 1 within r above it). Inner integral by the trapezoid
  // rule, outer by Simpson's rule on the same grid so that Φ(x + r) is a table look-up.
  const steps = Math.round(RANGE_LIMIT / STEP);
  let second = 0;
  for (let k = 1; k <= steps; k++) {
    let cdf = 0;
    for (let i = 0; i <= GRID; i++) cdf += pdf[i] * Math.pow(phi[i + k] - phi[i], n - 1);
    cdf *= n * STEP;
    const tail = Math.max(0, 1 - cdf);
    const weight = k === steps ? 1 : k % 2 === 1 ? 4 : 2;
    second += weight * k * STEP * tail;
    // Past the bulk of the distribution the remaining terms are zero to rounding.
    if (tail < 1e-17 && k * STEP > mean) break;
  }
  second = (2 * second * STEP) / 3;
  const result = { d2: mean, d3: Math.sqrt(Math.max(0, second - mean * mean)) };
  rangeMoments.set(n, result);
  return result;
}

/** Expected range of n standard normal values. */
export function d2(n: number): number {
  return moments(n).d2;
}

/** Standard deviation of the range of n standard normal values. */
export function d3(n: number): number {
  return moments(n).d3;
}

/** c4(n) = √(2/(n−1)) · Γ(n/2) / Γ((n−1)/2): the bias of the sample standard deviation. */
export function c4(n: number): number {
  checkSize(n);
  return Math.sqrt(2 / (n - 1)) * Math.exp(lnGamma(n / 2) - lnGamma((n - 1) / 2));
}

/** X̄ chart limits from R̄: X̿ ± A2·R̄. */
export function A2(n: number): number {
  return 3 / (d2(n) * Math.sqrt(n));
}

/** X̄ chart limits from S̄: X̿ ± A3·S̄. */
export function A3(n: number): number {
  return 3 / (c4(n) * Math.sqrt(n));
}

/** S chart lower limit factor: LCL = B3·S̄ (never below zero). */
export function B3(n: number): number {
  const c = c4(n);
  return Math.max(0, 1 - (3 * Math.sqrt(1 - c * c)) / c);
}

/** S chart upper limit factor: UCL = B4·S̄. */
export function B4(n: number): number {
  const c = c4(n);
  return 1 + (3 * Math.sqrt(1 - c * c)) / c;
}

/** R chart lower limit factor: LCL = D3·R̄ (never below zero). */
export function D3(n: number): number {
  const m = moments(n);
  return Math.max(0, 1 - (3 * m.d3) / m.d2);
}

/** R chart upper limit factor: UCL = D4·R̄. */
export function D4(n: number): number {
  const m = moments(n);
  return 1 + (3 * m.d3) / m.d2;
}

/** Individuals chart limits from the average moving range of span n: X̄ ± E2·MR̄. */
export function E2(n = 2): number {
  return 3 / d2(n);
}
