// Normal, gamma and chi-square functions the engine needs, written here so that the module has no
// runtime dependency and behaves the same in the jobs, the API and the browser.

const SQRT_2PI = Math.sqrt(2 * Math.PI);

/** Standard normal density. */
export function normalPdf(x: number): number {
  return Math.exp(-0.5 * x * x) / SQRT_2PI;
}

/**
 * Upper tail Q(a) = 1 − Φ(a) for a ≥ 0, computed without cancellation so that ppm figures far in
 * the tail keep their relative precision.
 */
export function normalUpperTail(a: number): number {
  if (a > 38) return 0;
  if (a <= 3) {
    // Hart (1968) rational approximation 5666; relative error below 1e-13 on [0, 3].
    let num = 3.52624965998911e-2 * a + 0.700383064443688;
    num = num * a + 6.37396220353165;
    num = num * a + 33.912866078383;
    num = num * a + 112.079291497871;
    num = num * a + 221.213596169931;
    num = num * a + 220.206867912376;
    let den = 8.83883476483184e-2 * a + 1.75566716318264;
    den = den * a + 16.064177579207;
    den = den * a + 86.7807322029461;
    den = den * a + 296.564248779674;
    den = den * a + 637.333633378831;
    den = den * a + 793.826512519948;
    den = den * a + 440.413735824752;
    return (Math.exp(-0.5 * a * a) * num) / den;
  }
  // Continued fraction for erfc(t), t = a/√2, evaluated with the modified Lentz method; it converges
  // in under 60 steps for t > 2.
  const t = a / Math.SQRT2;
  let f = t;
  let c = t;
  let d = 0;
  for (let k = 1; k < 200; k++) {
    const ak = k / 2;
    d = 1 / (t + ak * d);
    c = t + ak / c;
    const delta = c * d;
    f *= delta;
    if (Math.abs(delta - 1) < 2e-16) break;
  }
  return Math.exp(-t * t) / Math.sqrt(Math.PI) / f / 2;
}

/** Standard normal distribution function Φ(x). */
export function normalCdf(x: number): number {
  if (Number.isNaN(x)) return NaN;
  return x < 0 ? normalUpperTail(-x) : 1 - normalUpperTail(x);
}

/** Standard normal quantile Φ⁻¹(p), 0 < p < 1. */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) {
    if (p === 0) return -Infinity;
    if (p === 1) return Infinity;
    return NaN;
  }
  // Acklam's rational approximation (relative error about 1e-9), then one Halley step on the accurate
  // distribution function above.
  const a = [-3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1, 2.506628277459239];
  const b = [-5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1];
  const c = [-7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
  const d = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];
  const pLow = 0.02425;
  let x: number;
  if (p < pLow) {
    const q = Math.sqrt(-2 * Math.log(p));
    x = (((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) / ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  } else if (p <= 1 - pLow) {
    const q = p - 0.5;
    const r = q * q;
    x = ((((((a[0] * r + a[1]) * r + a[2]) * r + a[3]) * r + a[4]) * r + a[5]) * q) / (((((b[0] * r + b[1]) * r + b[2]) * r + b[3]) * r + b[4]) * r + 1);
  } else {
    const q = Math.sqrt(-2 * Math.log(1 - p));
    x = -(((((c[0] * q + c[1]) * q + c[2]) * q + c[3]) * q + c[4]) * q + c[5]) / ((((d[0] * q + d[1]) * q + d[2]) * q + d[3]) * q + 1);
  }
  // Work with the smaller tail so that the error term keeps its precision.
  const e = p < 0.5 ? normalCdf(x) - p : 1 - p - normalCdf(-x);
  const u = e * SQRT_2PI * Math.exp(0.5 * x * x);
  return x - u / (1 + 0.5 * x * u);
}

const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** ln Γ(x) for x > 0 (Lanczos approximation, g = 7). */
export function lnGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - lnGamma(1 - x);
  const z = x - 1;
  let s = LANCZOS[0];
  for (let i = 1; i < 9; i++) s += LANCZOS[i] / (z + i);
  const t = z + 7.5;
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(s);
}

/** Regularised lower incomplete gamma P(a, x). */
export function gammaP(a: number, x: number): number {
  if (x <= 0) return 0;
  const logPrefactor = a * Math.log(x) - x - lnGamma(a);
  if (x < a + 1) {
    // Series.
    let term = 1 / a;
    let sum = term;
    for (let k = 1; k < 100_000; k++) {
      term *= x / (a + k);
      sum += term;
      if (term < sum * 1e-16) break;
    }
    return Math.min(1, sum * Math.exp(logPrefactor));
  }
  // Continued fraction for Q(a, x) (modified Lentz).
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let k = 1; k < 100_000; k++) {
    const an = -k * (k - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return Math.max(0, 1 - Math.exp(logPrefactor) * h);
}

/** Chi-square distribution function with `df` degrees of freedom. */
export function chiSquareCdf(x: number, df: number): number {
  return gammaP(df / 2, x / 2);
}

/** Chi-square quantile: the x with P(χ²_df ≤ x) = p. */
export function chiSquareQuantile(p: number, df: number): number {
  if (!(p > 0 && p < 1) || !(df > 0)) return NaN;
  // Wilson–Hilferty start, then Newton steps kept inside a bracket (bisection when a step leaves it).
  const z = normalQuantile(p);
  const h = 2 / (9 * df);
  let x = Math.max(df * Math.pow(Math.max(1 - h + z * Math.sqrt(h), 0.01), 3), 1e-300);
  let lo = 0;
  let hi = Infinity;
  const a = df / 2;
  const logNorm = -lnGamma(a) - a * Math.LN2;
  for (let iter = 0; iter < 200; iter++) {
    const f = chiSquareCdf(x, df) - p;
    if (f === 0) return x;
    if (f < 0) lo = x;
    else hi = x;
    const density = Math.exp(logNorm + (a - 1) * Math.log(x) - x / 2);
    let next = x - f / density;
    if (!(next > lo && next < hi) || !Number.isFinite(next)) next = Number.isFinite(hi) ? (lo + hi) / 2 : x * 2;
    if (Math.abs(next - x) <= 1e-14 * x) return next;
    x = next;
  }
  return x;
}
