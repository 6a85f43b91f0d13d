// Process capability (Cp, Cpk, Cpl, Cpu: sigma within) and performance (Pp, Ppk, Ppl, Ppu: overall
// sample standard deviation), in the sense of ISO 22514-2, against a two-sided or one-sided
// specification. Confidence intervals at 95 %:
// - Cp and Pp: chi-square interval, Ĉ·√(χ²(α/2; ν)/ν) to Ĉ·√(χ²(1−α/2; ν)/ν), ν = n − 1;
// - Cpk, Ppk (and the one-sided indices they reduce to): Bissell's normal approximation,
//   Ĉ ± z(1−α/2)·√(1/(9n) + Ĉ²/(2(n − 1))) — A. F. Bissell, "How reliable is your capability index?",
//   Applied Statistics 39 (1990) 331–340.
// Using ν = n − 1 for sigma within too is the usual simplification; an R̄- or MR̄-based sigma has
// somewhat fewer effective degrees of freedom, so its Cp interval is a little optimistic.
import { SpcInputError } from './errors';
import { chiSquareQuantile, normalCdf, normalQuantile } from './distributions';
import { andersonDarling, type NormalityResult } from './normality';

export type Interval = [number, number];

export interface CapabilityInput {
  values: ArrayLike<number>;
  /** Sigma within from the control chart (R̄/d2, S̄/c4 or MR̄/d2); null when it is not known. */
  sigmaWithin: number | null;
  lsl?: number | null;
  usl?: number | null;
  /** Nominal value; with both limits it gives Cpm. */
  target?: number | null;
  /** Number of subgroups behind the values (default: one per value). */
  subgroupCount?: number;
  /** Run the Anderson–Darling test (default), skip it (false), or use a result computed earlier. */
  normality?: boolean | NormalityResult;
}

export type CapabilityNoteCode =
  | 'no-data'
  | 'no-spec'
  | 'spec-order'
  | 'one-sided'
  | 'no-sigma-within'
  | 'no-variation'
  | 'preliminary'
  | 'not-normal'
  | 'normality-unknown';

export interface CapabilityNote {
  code: CapabilityNoteCode;
  message: string;
}

export interface CapabilityResult {
  n: number;
  subgroupCount: number;
  mean: number | null;
  sigmaWithin: number | null;
  sigmaOverall: number | null;
  lsl: number | null;
  usl: number | null;
  target: number | null;
  cp: number | null;
  cpk: number | null;
  cpl: number | null;
  cpu: number | null;
  pp: number | null;
  ppk: number | null;
  ppl: number | null;
  ppu: number | null;
  cpm: number | null;
  cpCi95: Interval | null;
  cpkCi95: Interval | null;
  ppCi95: Interval | null;
  ppkCi95: Interval | null;
  /** Expected ppm outside the specification from a normal model with the mean and sigma overall. */
  ppmExpected: number | null;
  /** The same with sigma within: what the process would give if it stayed in control. */
  ppmExpectedWithin: number | null;
  /** Values outside the specification per million values (a value on a limit is inside). */
  ppmObserved: number | null;
  normality: NormalityResult | null;
  /** Fewer than 25 subgroups or 100 values. */
  preliminary: boolean;
  /** Plain-words reasons for every null above and cautions for reading the indices. */
  notes: CapabilityNote[];
}

/** Subgroups and values below which capability is only preliminary (common practice). */
export const CAPABILITY_MIN_SUBGROUPS = 25;
export const CAPABILITY_MIN_VALUES = 100;

const Z_975 = normalQuantile(0.975);

function specValue(name: string, v: number | null | undefined): number | null {
  if (v === undefined || v === null) return null;
  if (!Number.isFinite(v)) throw new SpcInputError(`${name} must be a finite number or absent, got ${v}`);
  return v;
}

function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

function chiSquareInterval(index: number | null, n: number): Interval | null {
  if (index === null || n < 2) return null;
  const df = n - 1;
  const lo = index * Math.sqrt(chiSquareQuantile(0.025, df) / df);
  const hi = index * Math.sqrt(chiSquareQuantile(0.975, df) / df);
  return Number.isFinite(lo) && Number.isFinite(hi) ? [lo, hi] : null;
}

function bissellInterval(index: number | null, n: number): Interval | null {
  if (index === null || n < 2) return null;
  const half = Z_975 * Math.sqrt(1 / (9 * n) + (index * index) / (2 * (n - 1)));
  return Number.isFinite(half) ? [index - half, index + half] : null;
}

/** Expected fraction outside the specification for a normal distribution, in ppm. */
function expectedPpm(mean: number, sigma: number, lsl: number | null, usl: number | null): number {
  if (sigma === 0) return (lsl !== null && mean < lsl) || (usl !== null && mean > usl) ? 1e6 : 0;
  const below = lsl === null ? 0 : normalCdf((lsl - mean) / sigma);
  const above = usl === null ? 0 : normalCdf((mean - usl) / sigma);
  return Math.min(1e6, 1e6 * (below + above));
}

interface Indices {
  whole: number | null;
  lower: number | null;
  upper: number | null;
  worst: number | null;
}

function indices(mean: number, sigma: number | null, lsl: number | null, usl: number | null): Indices {
  if (sigma === null || !(sigma > 0)) return { whole: null, lower: null, upper: null, worst: null };
  const whole = lsl !== null && usl !== null ? finiteOrNull((usl - lsl) / (6 * sigma)) : null;
  const lower = lsl !== null ? finiteOrNull((mean - lsl) / (3 * sigma)) : null;
  const upper = usl !== null ? finiteOrNull((usl - mean) / (3 * sigma)) : null;
  const worst = lower !== null && upper !== null ? Math.min(lower, upper) : (lower ?? upper);
  return { whole, lower, upper, worst };
}

interface Summary {
  sum: number;
  shift: number;
  /** Sums of (x − shift) and (x − shift)², shift being the first value. */
  d1: number;
  d2: number;
  outside: number;
}

// The pass over the values is a small function of its own with nothing after the loop, so that the
// optimiser compiles it whole; code after a long loop would be compiled without type information
// and fall back to the interpreter on every call.
function summarise(values: ArrayLike<number>, low: number, high: number): Summary {
  const n = values.length;
  const shift = n > 0 ? values[0] : 0;
  let sum = 0;
  let d1 = 0;
  let d2 = 0;
  let outside = 0;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    sum += v;
    const d = v - shift;
    d1 += d;
    d2 += d * d;
    outside += +(v < low) + +(v > high);
  }
  return { sum, shift, d1, d2, outside };
}

/**
 * Sample variance from the sums about the first value while it lies within a hundred standard
 * deviations of the mean; otherwise from a second pass about the mean.
 */
function variance(values: ArrayLike<number>, s: Summary, mean: number): number {
  const n = values.length;
  const v = Math.max(0, (s.d2 - (s.d1 * s.d1) / n) / (n - 1));
  const offset = mean - s.shift;
  return offset * offset <= 1e4 * v ? v : squaredDeviations(values, mean) / (n - 1);
}

function squaredDeviations(values: ArrayLike<number>, mean: number): number {
  let ss = 0;
  for (let i = 0; i < values.length; i++) {
    const e = values[i] - mean;
    ss += e * e;
  }
  return ss;
}

/** Capability and performance indices with intervals, ppm and a normality check. */
export function computeCapability(input: CapabilityInput): CapabilityResult {
  const lsl = specValue('lsl', input.lsl);
  const usl = specValue('usl', input.usl);
  const target = specValue('target', input.target);
  const values = input.values;
  const n = values.length;
  const subgroupCount = input.subgroupCount ?? n;
  const sigmaWithinIn = input.sigmaWithin;
  if (sigmaWithinIn !== null && !(Number.isFinite(sigmaWithinIn) && sigmaWithinIn >= 0)) {
    throw new SpcInputError(`sigmaWithin must be a finite number of zero or more, or null; got ${sigmaWithinIn}`);
  }
  const notes: CapabilityNote[] = [];
  const result: CapabilityResult = {
    n, subgroupCount, mean: null, sigmaWithin: sigmaWithinIn, sigmaOverall: null, lsl, usl, target,
    cp: null, cpk: null, cpl: null, cpu: null, pp: null, ppk: null, ppl: null, ppu: null, cpm: null,
    cpCi95: null, cpkCi95: null, ppCi95: null, ppkCi95: null,
    ppmExpected: null, ppmExpectedWithin: null, ppmObserved: null,
    normality: null,
    preliminary: subgroupCount < CAPABILITY_MIN_SUBGROUPS || n < CAPABILITY_MIN_VALUES,
    notes,
  };

  const pass = summarise(values, lsl ?? -Infinity, usl ?? Infinity);
  // NaN and ±Infinity carry through the sums, so one test finds them.
  if (!Number.isFinite(pass.sum + pass.d2)) {
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(values[i])) throw new SpcInputError(`value ${i} is ${values[i]}; every value must be a finite number`);
    }
  }
  if (n === 0) {
    notes.push({ code: 'no-data', message: 'No values were given, so capability cannot be computed.' });
    return result;
  }
  const outside = pass.outside;
  const mean = pass.sum / n;
  result.mean = mean;
  const sigmaOverall = n >= 2 ? finiteOrNull(Math.sqrt(variance(values, pass, mean))) : null;
  result.sigmaOverall = sigmaOverall;

  if (result.preliminary) {
    notes.push({
      code: 'preliminary',
      message: `Preliminary: ${subgroupCount} subgroup(s) and ${n} value(s). Quote capability only from at least ${CAPABILITY_MIN_SUBGROUPS} subgroups and ${CAPABILITY_MIN_VALUES} values; until then the indices can be far from the truth.`,
    });
  }

  const normality = input.normality === undefined || input.normality === true ? andersonDarling(values) : input.normality === false ? null : input.normality;
  result.normality = normality;
  if (normality !== null) {
    if (normality.p === null) notes.push({ code: 'normality-unknown', message: `Normality could not be checked: ${normality.reason ?? 'no p-value.'}` });
    else if (normality.p < 0.05) {
      notes.push({
        code: 'not-normal',
        message: `The values do not look normally distributed (Anderson–Darling p ${normality.p < 0.001 ? '< 0.001' : `= ${normality.p.toFixed(3)}`}). The indices and the expected ppm assume a normal distribution and may mislead; compare with the observed ppm and look at the histogram.`,
      });
    }
  }

  if (lsl === null && usl === null) {
    notes.push({ code: 'no-spec', message: 'No specification limit is set, so there is nothing to compare the process with.' });
    return result;
  }
  if (lsl !== null && usl !== null && lsl >= usl) {
    notes.push({ code: 'spec-order', message: `The lower specification limit (${lsl}) is not below the upper one (${usl}).` });
    return result;
  }
  result.ppmObserved = (outside / n) * 1e6;
  if (lsl === null || usl === null) {
    notes.push({ code: 'one-sided', message: `Only ${lsl === null ? 'an upper' : 'a lower'} specification limit is set, so Cp and Pp (which need both) are not given; Cpk and Ppk are the one-sided ${lsl === null ? 'Cpu and Ppu' : 'Cpl and Ppl'}.` });
  }

  const within = indices(mean, sigmaWithinIn, lsl, usl);
  const overall = indices(mean, sigmaOverall, lsl, usl);
  [result.cp, result.cpl, result.cpu, result.cpk] = [within.whole, within.lower, within.upper, within.worst];
  [result.pp, result.ppl, result.ppu, result.ppk] = [overall.whole, overall.lower, overall.upper, overall.worst];
  result.cpCi95 = chiSquareInterval(result.cp, n);
  result.cpkCi95 = bissellInterval(result.cpk, n);
  result.ppCi95 = chiSquareInterval(result.pp, n);
  result.ppkCi95 = bissellInterval(result.ppk, n);
  if (sigmaOverall !== null) {
    result.ppmExpected = expectedPpm(mean, sigmaOverall, lsl, usl);
    if (target !== null && lsl !== null && usl !== null) {
      const spread = Math.sqrt(sigmaOverall * sigmaOverall + (mean - target) * (mean - target));
      result.cpm = spread > 0 ? finiteOrNull((usl - lsl) / (6 * spread)) : null;
    }
  }
  if (sigmaWithinIn !== null) result.ppmExpectedWithin = expectedPpm(mean, sigmaWithinIn, lsl, usl);

  if (sigmaWithinIn === null) notes.push({ code: 'no-sigma-within', message: 'Sigma within is not known, so Cp, Cpk, Cpl and Cpu are not given.' });
  if (sigmaWithinIn === 0 || sigmaOverall === 0) {
    notes.push({ code: 'no-variation', message: 'The values show no variation, so the indices would be infinite and are not given.' });
  }
  if (sigmaOverall === null) notes.push({ code: 'no-variation', message: 'A single value has no standard deviation, so Pp and Ppk are not given.' });
  return result;
}
