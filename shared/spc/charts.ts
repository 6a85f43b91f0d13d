// Shewhart control charts: X̄–R, X̄–S and individuals with moving range (I–MR).
//
// Phase I estimates the centre line and sigma within from the points that are kept (the caller's
// exclusions are left out of the estimate); phase II judges points against limits the caller froze.
// Sigma within is the average of Rᵢ/d2(nᵢ), of Sᵢ/c4(nᵢ), or MR̄/d2(2); with equal subgroup sizes
// these are R̄/d2, S̄/c4 and MR̄/1.128. Limits of a point depend on its subgroup size nᵢ:
//   X̄:  X̿ ± 3σ/√nᵢ      R:  d2·σ, (d2 ± 3·d3)·σ      S:  c4·σ, (c4 ± 3·√(1 − c4²))·σ
// (lower limits of R, S and MR never below zero); MR uses the R formulas with n = 2.
import { c4 as c4Of, d2 as d2Of, d3 as d3Of } from './constants';
import { SpcInputError } from './errors';
import { findViolations, resolveRules, type DispersionSeries, type RuleId, type RuleSelection, type Violation } from './rules';

/** The chart types, in the order forms list them. */
export const CHART_TYPES = ['xbar-r', 'xbar-s', 'imr'] as const;
export type ChartType = (typeof CHART_TYPES)[number];

/** The chart types in words. */
export const chartTypeLabels: Record<ChartType, string> = {
  'xbar-r': 'X̄ and R chart',
  'xbar-s': 'X̄ and S chart',
  imr: 'Individuals and moving range chart',
};

/** What the location and dispersion charts plot, by chart type: symbols, and the dispersion statistic's name. */
export const statisticNames: Record<ChartType, { location: string; dispersion: string; dispersionName: string }> = {
  'xbar-r': { location: 'X̄', dispersion: 'R', dispersionName: 'Range' },
  'xbar-s': { location: 'X̄', dispersion: 'S', dispersionName: 'Standard deviation' },
  imr: { location: 'I', dispersion: 'MR', dispersionName: 'Moving range' },
};

/** Fewer kept subgroups than this give preliminary trial limits (common practice: 20 to 25 subgroups). */
export const PHASE_ONE_MIN_POINTS = 20;

/** Everything needed to rebuild the limits of a chart for any subgroup size in phase II. */
export interface FrozenLimits {
  chart: ChartType;
  center: number;
  sigmaWithin: number;
}

export interface ChartInput {
  /** One array per subgroup, in time order. Use either this or `values`. */
  subgroups?: ArrayLike<ArrayLike<number>>;
  /** All values in time order, subgroup after subgroup (a Float64Array is used without copying). */
  values?: ArrayLike<number>;
  /** With `values`: every subgroup has this many values (default 1, individuals). */
  subgroupSize?: number;
  /** With `values`: the size of each subgroup, in order (instead of `subgroupSize`). */
  sizes?: ArrayLike<number>;
  /** Chart type; by default I–MR for single values, X̄–R up to 10 per subgroup, X̄–S above. */
  chart?: ChartType;
  /** Point positions left out of the phase I estimate and of the run rules (assignable cause). */
  excluded?: Iterable<number>;
  /** Phase II: judge every point against these limits instead of estimating new ones. */
  frozen?: FrozenLimits;
  /** 'we' (default): the four Western Electric rules; 'extended': all eight; or a list of rules. */
  rules?: RuleSelection;
}

export interface Limits {
  center: number | null;
  ucl: number | null;
  lcl: number | null;
  /** Standard deviation of the plotted statistic at the headline subgroup size. */
  sigma: number | null;
}

export interface LocationLimits extends Limits {
  /** Zone lines at ±1σ and ±2σ of the plotted statistic (zone C inside 1σ, B to 2σ, A to 3σ). */
  zones: { minusTwo: number; minusOne: number; plusOne: number; plusTwo: number } | null;
}

export type ReasonCode =
  | 'no-data'
  | 'all-excluded'
  | 'no-sigma-within'
  | 'zero-sigma-within'
  | 'no-sigma-overall'
  | 'single-value-subgroups'
  | 'r-chart-large-subgroups'
  | 'individuals-from-subgroups';

export interface Reason {
  code: ReasonCode;
  message: string;
}

export interface PointColumns {
  count: number;
  /** Subgroup size of each point when sizes vary; null when all are `subgroupSize`. */
  size: Int32Array | null;
  /** X̄ of each subgroup, or the individual value (for I–MR given a Float64Array, the input itself). */
  location: Float64Array;
  /** R, S or MR of each point; 0 where `hasDispersion` is 0 (first I–MR point, single-value subgroups). */
  dispersion: Float64Array;
  hasDispersion: Uint8Array;
  /** 1 marks a point the caller excluded; null when none was. */
  excluded: Uint8Array | null;
  /** Per-point limits, only when subgroup sizes vary (otherwise the headline limits apply to all). */
  perPoint: {
    locationSigma: Float64Array;
    locationUcl: Float64Array;
    locationLcl: Float64Array;
    dispersionCenter: Float64Array;
    dispersionUcl: Float64Array;
    dispersionLcl: Float64Array;
  } | null;
}

export interface ChartResult {
  chart: ChartType;
  phase: 'I' | 'II';
  subgroupCount: number;
  valueCount: number;
  /** The common subgroup size, or null when sizes vary. */
  subgroupSize: number | null;
  /** The subgroup size the headline `location` and `dispersion` limits are given for. */
  limitsSubgroupSize: number;
  location: LocationLimits;
  dispersion: Limits;
  sigmaWithin: number | null;
  /** Sample standard deviation (n − 1) of the values kept. */
  sigmaOverall: number | null;
  /** Mean of the values kept. */
  mean: number | null;
  /** Limits to store for phase II; null when they could not be estimated. */
  frozen: FrozenLimits | null;
  rules: RuleId[];
  points: PointColumns;
  /** Sorted by point, location before dispersion, then rule. */
  violations: Violation[];
  reasons: Reason[];
}

/** One point with its limits, in plain values (null where there is none). */
export interface ChartPoint {
  index: number;
  size: number;
  location: number;
  dispersion: number | null;
  excluded: boolean;
  locationLimits: { center: number | null; ucl: number | null; lcl: number | null };
  dispersionLimits: { center: number | null; ucl: number | null; lcl: number | null };
}

interface Layout {
  values: Float64Array;
  count: number;
  /** Common size, or 0 when `offsets` gives the subgroups. */
  size: number;
  offsets: Int32Array | null;
}

function toFloat64(values: ArrayLike<number>): Float64Array {
  return values instanceof Float64Array ? values : Float64Array.from(values);
}

function layoutOf(input: ChartInput): Layout {
  if (input.subgroups !== undefined) {
    if (input.values !== undefined) throw new SpcInputError('give either subgroups or values, not both');
    const groups = input.subgroups;
    const count = groups.length;
    let total = 0;
    let common = count > 0 ? groups[0].length : 1;
    for (let g = 0; g < count; g++) {
      const len = groups[g].length;
      if (len === 0) throw new SpcInputError(`subgroup ${g} is empty`);
      if (len !== common) common = 0;
      total += len;
    }
    const values = new Float64Array(total);
    const offsets = common === 0 ? new Int32Array(count + 1) : null;
    let at = 0;
    for (let g = 0; g < count; g++) {
      const group = groups[g];
      if (offsets) offsets[g] = at;
      for (let j = 0; j < group.length; j++) values[at++] = group[j];
    }
    if (offsets) offsets[count] = at;
    return { values, count, size: common, offsets };
  }
  const values = toFloat64(input.values ?? []);
  if (input.sizes !== undefined) {
    const sizes = input.sizes;
    const offsets = new Int32Array(sizes.length + 1);
    let at = 0;
    let common = sizes.length > 0 ? sizes[0] : 1;
    for (let g = 0; g < sizes.length; g++) {
      const len = sizes[g];
      if (!Number.isInteger(len) || len < 1) throw new SpcInputError(`subgroup ${g} has size ${len}; sizes must be whole numbers of at least 1`);
      if (len !== common) common = 0;
      offsets[g] = at;
      at += len;
    }
    offsets[sizes.length] = at;
    if (at !== values.length) throw new SpcInputError(`the sizes add up to ${at} values but ${values.length} were given`);
    return common === 0 ? { values, count: sizes.length, size: 0, offsets } : { values, count: sizes.length, size: common, offsets: null };
  }
  const size = input.subgroupSize ?? 1;
  if (!Number.isInteger(size) || size < 1) throw new SpcInputError(`subgroupSize must be a whole number of at least 1, got ${size}`);
  if (values.length % size !== 0) throw new SpcInputError(`${values.length} values do not split into subgroups of ${size}`);
  return { values, count: values.length / size, size, offsets: null };
}

/**
 * Throws for the first value that is not a finite number. Called when a sum over the values is not
 * finite: NaN and ±Infinity carry through sums, so the hot loops need no test of their own.
 */
function rejectNonFinite(values: Float64Array): void {
  for (let i = 0; i < values.length; i++) {
    if (!Number.isFinite(values[i])) throw new SpcInputError(`value ${i} is ${values[i]}; every value must be a finite number`);
  }
}

function sizeAt(layout: Layout, g: number): number {
  return layout.offsets === null ? layout.size : layout.offsets[g + 1] - layout.offsets[g];
}

function chooseChart(layout: Layout, input: ChartInput): ChartType {
  if (input.chart !== undefined && input.frozen !== undefined && input.chart !== input.frozen.chart) {
    throw new SpcInputError(`chart ${input.chart} was requested but the frozen limits belong to ${input.frozen.chart}`);
  }
  const requested = input.chart ?? input.frozen?.chart;
  if (requested !== undefined) {
    if (requested !== 'xbar-r' && requested !== 'xbar-s' && requested !== 'imr') throw new SpcInputError(`unknown chart type ${String(requested)}`);
    return requested;
  }
  let largest = layout.size;
  if (layout.offsets !== null) for (let g = 0; g < layout.count; g++) largest = Math.max(largest, sizeAt(layout, g));
  return largest <= 1 ? 'imr' : largest <= 10 ? 'xbar-r' : 'xbar-s';
}

function exclusionMask(excluded: Iterable<number> | undefined, count: number): Uint8Array | null {
  if (excluded === undefined) return null;
  let mask: Uint8Array | null = null;
  for (const i of excluded) {
    if (!Number.isInteger(i) || i < 0 || i >= count) throw new SpcInputError(`excluded point ${i} is not a point position (0 to ${count - 1})`);
    mask ??= new Uint8Array(count);
    mask[i] = 1;
  }
  return mask;
}

function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

/** Most frequent subgroup size of two or more (ties to the larger), or 1 when there is none. */
function modalSize(layout: Layout): number {
  if (layout.offsets === null) return layout.size;
  const counts = new Map<number, number>();
  for (let g = 0; g < layout.count; g++) {
    const n = sizeAt(layout, g);
    if (n >= 2) counts.set(n, (counts.get(n) ?? 0) + 1);
  }
  let best = 1;
  let bestCount = 0;
  for (const [n, k] of counts) if (k > bestCount || (k === bestCount && n > best)) [best, bestCount] = [n, k];
  return best;
}

interface DispersionModel {
  center: (n: number, sigma: number) => number;
  spread: (n: number, sigma: number) => number;
}

const RANGE_MODEL: DispersionModel = { center: (n, s) => d2Of(n) * s, spread: (n, s) => d3Of(n) * s };
const STDEV_MODEL: DispersionModel = {
  center: (n, s) => c4Of(n) * s,
  spread: (n, s) => {
    const c = c4Of(n);
    return Math.sqrt(1 - c * c) * s;
  },
};

/**
 * Builds a control chart: the plotted points, phase I limits (or the caller's frozen phase II
 * limits), sigma within and overall, and the run-rule violations.
 */
export function computeChart(input: ChartInput): ChartResult {
  let layout = layoutOf(input);
  const chart = chooseChart(layout, input);
  const reasons: Reason[] = [];
  if (chart === 'imr' && (layout.size !== 1 || layout.offsets !== null)) {
    if (layout.count > 0) reasons.push({ code: 'individuals-from-subgroups', message: 'I–MR was asked for subgrouped data, so every value is charted as an individual, in subgroup order.' });
    layout = { values: layout.values, count: layout.values.length, size: 1, offsets: null };
  }
  const rules = resolveRules(input.rules);
  const count = layout.count;
  const excluded = exclusionMask(input.excluded, count);
  const frozen = input.frozen;
  if (frozen !== undefined && !(Number.isFinite(frozen.center) && Number.isFinite(frozen.sigmaWithin) && frozen.sigmaWithin >= 0)) {
    throw new SpcInputError('frozen limits need a finite centre and a sigma within of zero or more');
  }
  if (chart === 'xbar-r' && modalSize(layout) > 10) {
    reasons.push({ code: 'r-chart-large-subgroups', message: 'X̄–R was asked for subgroups of more than 10 values; the range wastes information there and X̄–S is the better chart.' });
  }

  const stats = chart === 'imr' ? individualsStats(layout, excluded) : subgroupStats(layout, chart, excluded);
  if (!Number.isFinite(stats.finiteCheck)) rejectNonFinite(layout.values);
  const keptValues = stats.keptValues;
  if (count === 0) reasons.push({ code: 'no-data', message: 'No values were given, so there is nothing to chart.' });
  else if (keptValues === 0) reasons.push({ code: 'all-excluded', message: 'Every point is excluded; the limits need at least one point that is kept.' });

  const mean = keptValues > 0 ? stats.keptSum / keptValues : null;
  let sigmaOverall: number | null = null;
  if (mean !== null && keptValues >= 2) sigmaOverall = finiteOrNull(Math.sqrt(overallVariance(stats, layout, excluded, mean)));
  else if (count > 0) reasons.push({ code: 'no-sigma-overall', message: 'The overall standard deviation needs at least two values that are kept.' });

  let center: number | null;
  let sigmaWithin: number | null;
  if (frozen !== undefined) {
    center = frozen.center;
    sigmaWithin = frozen.sigmaWithin;
  } else {
    center = mean;
    sigmaWithin = stats.withinCount > 0 ? finiteOrNull(stats.withinSum / stats.withinCount) : null;
    if (sigmaWithin === null && count > 0 && keptValues > 0) {
      reasons.push({
        code: 'no-sigma-within',
        message: chart === 'imr'
          ? 'Sigma within cannot be estimated: it needs at least two consecutive values that are kept, so the chart has a centre line but no limits.'
          : 'Sigma within cannot be estimated: it needs at least one kept subgroup of two or more values, so the chart has a centre line but no limits.',
      });
    }
  }
  if (stats.singleValueSubgroups > 0 && chart !== 'imr') {
    reasons.push({ code: 'single-value-subgroups', message: `${stats.singleValueSubgroups} subgroup(s) have a single value: they are plotted on the X̄ chart but have no ${chart === 'xbar-r' ? 'range' : 'standard deviation'}.` });
  }

  const headlineSize = chart === 'imr' ? 1 : modalSize(layout);
  const model = chart === 'xbar-s' ? STDEV_MODEL : RANGE_MODEL;
  const dispersionSize = chart === 'imr' ? 2 : headlineSize;
  const location: LocationLimits = { center, ucl: null, lcl: null, sigma: null, zones: null };
  const dispersion: Limits = { center: null, ucl: null, lcl: null, sigma: null };
  let perPoint: PointColumns['perPoint'] = null;
  const judged = rules.length > 0 && center !== null && sigmaWithin !== null;
  const activeRules = judged && sigmaWithin === 0 ? rules.filter((r) => r === 'we1') : rules;
  if (sigmaWithin === 0) {
    reasons.push({ code: 'zero-sigma-within', message: 'There is no variation within subgroups (or between consecutive values), so the limits collapse onto the centre line; only rule we1, a point beyond a limit, is checked.' });
  }

  if (center !== null && sigmaWithin !== null) {
    const s = sigmaWithin / Math.sqrt(headlineSize);
    location.sigma = s;
    location.ucl = center + 3 * s;
    location.lcl = center - 3 * s;
    location.zones = { minusTwo: center - 2 * s, minusOne: center - s, plusOne: center + s, plusTwo: center + 2 * s };
    if (dispersionSize >= 2) {
      const dc = model.center(dispersionSize, sigmaWithin);
      const ds = model.spread(dispersionSize, sigmaWithin);
      dispersion.center = dc;
      dispersion.sigma = ds;
      dispersion.ucl = dc + 3 * ds;
      dispersion.lcl = Math.max(0, dc - 3 * ds);
    }
    if (layout.offsets !== null) perPoint = perPointLimits(layout, center, sigmaWithin, model);
  }

  const violations: Violation[] = [];
  if (judged && count > 0) {
    const sigma = perPoint !== null ? perPoint.locationSigma : (location.sigma as number);
    const ucl = perPoint !== null ? perPoint.dispersionUcl : dispersion.ucl;
    const lcl = perPoint !== null ? perPoint.dispersionLcl : dispersion.lcl;
    let spread: DispersionSeries | null = null;
    if (ucl !== null && lcl !== null) {
      spread = stats.dispersion === null || stats.hasDispersion === null
        ? { values: null, ucl, lcl, judged: null }
        : { values: stats.dispersion, ucl, lcl, judged: excluded === null && stats.singleValueSubgroups === 0 ? null : judgedDispersion(stats.hasDispersion, excluded) };
    }
    findViolations({ values: stats.location, center: center as number, sigma, skip: excluded }, spread, activeRules, violations);
  }

  let sizeColumn: Int32Array | null = null;
  if (layout.offsets !== null) {
    sizeColumn = new Int32Array(count);
    for (let g = 0; g < count; g++) sizeColumn[g] = sizeAt(layout, g);
  }

  return {
    chart,
    phase: frozen !== undefined ? 'II' : 'I',
    subgroupCount: count,
    valueCount: layout.values.length,
    subgroupSize: layout.offsets === null ? layout.size : null,
    limitsSubgroupSize: headlineSize,
    location,
    dispersion,
    sigmaWithin,
    sigmaOverall,
    mean,
    frozen: center !== null && sigmaWithin !== null ? { chart, center, sigmaWithin } : null,
    rules: judged ? activeRules : [],
    points: pointColumns(count, sizeColumn, stats, excluded, perPoint),
    violations,
    reasons,
  };
}

function judgedDispersion(has: Uint8Array, excluded: Uint8Array | null): Uint8Array {
  if (excluded === null) return has;
  const judged = new Uint8Array(has.length);
  for (let i = 0; i < has.length; i++) judged[i] = has[i] === 1 && excluded[i] === 0 ? 1 : 0;
  return judged;
}

interface Stats {
  location: Float64Array;
  /** Null for I–MR: the moving ranges follow from the values and are computed when first read. */
  dispersion: Float64Array | null;
  hasDispersion: Uint8Array | null;
  keptValues: number;
  keptSum: number;
  /** Sums of (x − shift) and (x − shift)² over the kept values, shift being the first value. */
  shift: number;
  shiftedSum: number;
  shiftedSquares: number;
  /** Not finite when a value is NaN or ±Infinity (they carry through sums). */
  finiteCheck: number;
  /** Sum and count of the per-point sigma estimates (Rᵢ/d2, Sᵢ/c4 or MRᵢ/d2(2)). */
  withinSum: number;
  withinCount: number;
  singleValueSubgroups: number;
}

function individualsStats(layout: Layout, excluded: Uint8Array | null): Stats {
  const x = layout.values;
  const sums = excluded === null ? individualSums(x) : individualSumsExcluding(x, excluded);
  const d2 = sums.mrCount > 0 ? d2Of(2) : 1;
  return {
    location: x, dispersion: null, hasDispersion: null, keptValues: sums.kept, keptSum: sums.sum, shift: sums.shift,
    shiftedSum: sums.d1, shiftedSquares: sums.d2, finiteCheck: sums.sum + sums.d2,
    withinSum: sums.mrSum / d2, withinCount: sums.mrCount, singleValueSubgroups: 0,
  };
}

interface IndividualSums {
  kept: number;
  sum: number;
  shift: number;
  d1: number;
  d2: number;
  mrSum: number;
  mrCount: number;
}

// The passes over the values are functions with nothing after their loop: code after a long loop
// would be optimised without type information and fall back to the interpreter on every call.
function individualSums(x: Float64Array): IndividualSums {
  const n = x.length;
  const shift = n > 0 ? x[0] : 0;
  let sum = shift;
  let d1 = 0;
  let d2 = 0;
  let mrSum = 0;
  let previous = shift;
  for (let i = 1; i < n; i++) {
    const v = x[i];
    mrSum += Math.abs(v - previous);
    const d = v - shift;
    sum += v;
    d1 += d;
    d2 += d * d;
    previous = v;
  }
  return { kept: n, sum, shift, d1, d2, mrSum, mrCount: Math.max(0, n - 1) };
}

function individualSumsExcluding(x: Float64Array, excluded: Uint8Array): IndividualSums {
  const n = x.length;
  const shift = n > 0 ? x[0] : 0;
  let sum = 0;
  let d1 = 0;
  let d2 = 0;
  let kept = 0;
  let mrSum = 0;
  let mrCount = 0;
  for (let i = 0; i < n; i++) {
    const v = x[i];
    if (excluded[i] === 1) {
      sum += v - v; // carries NaN and ±Infinity into the finiteness check
      continue;
    }
    if (i > 0 && excluded[i - 1] === 0) {
      mrSum += Math.abs(v - x[i - 1]);
      mrCount++;
    }
    const d = v - shift;
    sum += v;
    d1 += d;
    d2 += d * d;
    kept++;
  }
  return { kept, sum, shift, d1, d2, mrSum, mrCount };
}

function pointColumns(count: number, size: Int32Array | null, stats: Stats, excluded: Uint8Array | null, perPoint: PointColumns['perPoint']): PointColumns {
  const { location, dispersion, hasDispersion } = stats;
  if (dispersion !== null && hasDispersion !== null) return { count, size, location, dispersion, hasDispersion, excluded, perPoint };
  // I–MR: the moving ranges are a function of the values, so they are only built when read.
  let movingRange: Float64Array | undefined;
  let has: Uint8Array | undefined;
  return {
    count, size, location, excluded, perPoint,
    get dispersion() {
      movingRange ??= movingRanges(location);
      return movingRange;
    },
    get hasDispersion() {
      if (has === undefined) {
        has = new Uint8Array(count).fill(1);
        if (count > 0) has[0] = 0;
      }
      return has;
    },
  };
}

/** |xᵢ − xᵢ₋₁| for i ≥ 1; entry 0 has no moving range and holds 0. */
function movingRanges(x: Float64Array): Float64Array {
  const mr = new Float64Array(x.length);
  for (let i = 1; i < x.length; i++) mr[i] = Math.abs(x[i] - x[i - 1]);
  return mr;
}

function subgroupStats(layout: Layout, chart: ChartType, excluded: Uint8Array | null): Stats {
  const k = layout.count;
  const useRange = chart === 'xbar-r';
  // Bias factors d2(n) or c4(n) for the sizes present, looked up by size inside the pass.
  const sizes = new Set<number>();
  if (layout.offsets === null) sizes.add(layout.size);
  else for (let g = 0; g < k; g++) sizes.add(layout.offsets[g + 1] - layout.offsets[g]);
  const factors = new Float64Array(Math.max(...sizes, 1) + 1).fill(1);
  for (const n of sizes) if (n >= 2) factors[n] = useRange ? d2Of(n) : c4Of(n);
  const columns = { means: new Float64Array(k), spread: new Float64Array(k), has: new Uint8Array(k) };
  const sums = subgroupPass(layout, useRange, excluded, factors, columns);
  return {
    location: columns.means, dispersion: columns.spread, hasDispersion: columns.has,
    keptValues: sums.keptValues, keptSum: sums.keptSum, shift: sums.shift, finiteCheck: sums.finiteCheck,
    shiftedSum: sums.shiftedSum, shiftedSquares: sums.shiftedSquares,
    withinSum: sums.withinSum, withinCount: sums.withinCount, singleValueSubgroups: sums.singles,
  };
}

interface SubgroupSums {
  keptValues: number;
  keptSum: number;
  shift: number;
  shiftedSum: number;
  shiftedSquares: number;
  finiteCheck: number;
  withinSum: number;
  withinCount: number;
  singles: number;
}

/** One pass over the subgroups: mean and range or standard deviation of each, and the sums. */
function subgroupPass(
  layout: Layout,
  useRange: boolean,
  excluded: Uint8Array | null,
  factors: Float64Array,
  out: { means: Float64Array; spread: Float64Array; has: Uint8Array },
): SubgroupSums {
  const { values: x, count: k, size, offsets } = layout;
  const { means, spread, has } = out;
  const shift = x.length > 0 ? x[0] : 0;
  const pick = new Float64Array(4);
  let keptValues = 0;
  let keptSum = 0;
  let shiftedSum = 0;
  let shiftedSquares = 0;
  let finiteCheck = 0;
  let withinSum = 0;
  let withinCount = 0;
  let singles = 0;
  for (let g = 0; g < k; g++) {
    const start = offsets === null ? g * size : offsets[g];
    const end = offsets === null ? start + size : offsets[g + 1];
    const n = end - start;
    let sum = 0;
    let d1 = 0;
    let d2 = 0;
    let lo = x[start];
    let hi = lo;
    for (let j = start; j < end; j++) {
      const v = x[j];
      sum += v;
      const d = v - shift;
      d1 += d;
      d2 += d * d;
      if (useRange) {
        // Smallest and largest by picking from a scratch array with the comparison as index: exact
        // and free of branches, which mispredict on random data (Math.min and Math.max branch too).
        pick[0] = lo;
        pick[1] = v;
        pick[2] = hi;
        pick[3] = v;
        lo = pick[+(v < lo)];
        hi = pick[2 + +(v > hi)];
      }
    }
    const m = sum / n;
    means[g] = m;
    finiteCheck += d2;
    const kept = excluded === null || excluded[g] === 0;
    if (kept) {
      keptSum += sum;
      keptValues += n;
      shiftedSum += d1;
      shiftedSquares += d2;
    }
    if (n < 2) {
      singles++;
      continue;
    }
    let d = hi - lo;
    if (!useRange) {
      let ss = 0;
      for (let j = start; j < end; j++) {
        const e = x[j] - m;
        ss += e * e;
      }
      d = Math.sqrt(ss / (n - 1));
    }
    spread[g] = d;
    has[g] = 1;
    if (kept) {
      withinSum += d / factors[n];
      withinCount++;
    }
  }
  return { keptValues, keptSum, shift, shiftedSum, shiftedSquares, finiteCheck, withinSum, withinCount, singles };
}

/**
 * Sample variance of the kept values from the sums about the first value, taken in the same pass as
 * the chart statistics. That is exact enough while the first value lies within a hundred standard
 * deviations of the mean; otherwise a second pass about the mean is made.
 */
function overallVariance(stats: Stats, layout: Layout, excluded: Uint8Array | null, mean: number): number {
  const n = stats.keptValues;
  const variance = Math.max(0, (stats.shiftedSquares - (stats.shiftedSum * stats.shiftedSum) / n) / (n - 1));
  const offset = mean - stats.shift;
  if (offset * offset <= 1e4 * variance) return variance;
  return sumSquaredDeviations(layout, excluded, mean) / (n - 1);
}

function sumSquaredDeviations(layout: Layout, excluded: Uint8Array | null, mean: number): number {
  const x = layout.values;
  let ss = 0;
  if (excluded === null) {
    for (let i = 0; i < x.length; i++) {
      const e = x[i] - mean;
      ss += e * e;
    }
    return ss;
  }
  for (let g = 0; g < layout.count; g++) {
    if (excluded[g] === 1) continue;
    const start = layout.offsets === null ? g * layout.size : layout.offsets[g];
    const end = layout.offsets === null ? start + layout.size : layout.offsets[g + 1];
    for (let j = start; j < end; j++) {
      const e = x[j] - mean;
      ss += e * e;
    }
  }
  return ss;
}

function perPointLimits(layout: Layout, center: number, sigmaWithin: number, model: DispersionModel): NonNullable<PointColumns['perPoint']> {
  const k = layout.count;
  const cols = {
    locationSigma: new Float64Array(k),
    locationUcl: new Float64Array(k),
    locationLcl: new Float64Array(k),
    dispersionCenter: new Float64Array(k),
    dispersionUcl: new Float64Array(k),
    dispersionLcl: new Float64Array(k),
  };
  for (let g = 0; g < k; g++) {
    const n = sizeAt(layout, g);
    const s = sigmaWithin / Math.sqrt(n);
    cols.locationSigma[g] = s;
    cols.locationUcl[g] = center + 3 * s;
    cols.locationLcl[g] = center - 3 * s;
    if (n >= 2) {
      const dc = model.center(n, sigmaWithin);
      const ds = model.spread(n, sigmaWithin);
      cols.dispersionCenter[g] = dc;
      cols.dispersionUcl[g] = dc + 3 * ds;
      cols.dispersionLcl[g] = Math.max(0, dc - 3 * ds);
    }
  }
  return cols;
}

/** One point of a chart as plain values, with null where a point has no dispersion value or limit. */
export function pointAt(result: ChartResult, index: number): ChartPoint {
  const p = result.points;
  if (!Number.isInteger(index) || index < 0 || index >= p.count) throw new RangeError(`no point ${index}`);
  const has = p.hasDispersion[index] === 1;
  const pp = p.perPoint;
  const size = p.size !== null ? p.size[index] : (result.subgroupSize as number);
  return {
    index,
    size,
    location: p.location[index],
    dispersion: has ? p.dispersion[index] : null,
    excluded: p.excluded !== null && p.excluded[index] === 1,
    locationLimits: pp !== null
      ? { center: result.location.center, ucl: pp.locationUcl[index], lcl: pp.locationLcl[index] }
      : { center: result.location.center, ucl: result.location.ucl, lcl: result.location.lcl },
    dispersionLimits: !has && result.chart !== 'imr'
      ? { center: null, ucl: null, lcl: null }
      : pp !== null
        ? { center: pp.dispersionCenter[index], ucl: pp.dispersionUcl[index], lcl: pp.dispersionLcl[index] }
        : { center: result.dispersion.center, ucl: result.dispersion.ucl, lcl: result.dispersion.lcl },
  };
}

/** All points as plain objects (for small charts: the API and the web app). */
export function pointList(result: ChartResult): ChartPoint[] {
  const out = new Array<ChartPoint>(result.points.count);
  for (let i = 0; i < out.length; i++) out[i] = pointAt(result, i);
  return out;
}
