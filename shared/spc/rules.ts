// Run rules, evaluated in one pass per chart with running counters and bit windows, so that the cost
// per point stays constant however long the pattern is.
//
// Conventions (ours, stated so that the web app and the reports say the same thing):
// - "beyond kσ" is strictly beyond: a point exactly on a control limit or zone line is not beyond it;
//   "within 1σ" (hugging) therefore includes the 1σ lines themselves.
// - A point exactly on the centre line is on neither side: it ends a run of rule we4.
// - Equal consecutive values end a trend and an alternating run.
// - A violation is reported at every point that completes the pattern, so a run of ten points on one
//   side gives three we4 violations (at the 8th, 9th and 10th point) with overlapping point lists.
// - Points the caller excluded (assignable cause found) are skipped: they neither count towards a
//   pattern nor break one.
// - `points` lists the consecutive judged points from the first one the pattern needs to `index`.

export type RuleId = 'we1' | 'we2' | 'we3' | 'we4' | 'trend' | 'alternating' | 'hugging' | 'mixture';
export type ChartPart = 'location' | 'dispersion';
export type RuleSelection = 'we' | 'extended' | readonly RuleId[];

export interface Violation {
  rule: RuleId;
  chart: ChartPart;
  /** The point that completes the pattern (0-based subgroup or point position). */
  index: number;
  /** Every point in the pattern, in order, ending with `index`. */
  points: number[];
}

export const WESTERN_ELECTRIC_RULES: readonly RuleId[] = ['we1', 'we2', 'we3', 'we4'];
export const EXTENDED_RULES: readonly RuleId[] = ['we1', 'we2', 'we3', 'we4', 'trend', 'alternating', 'hugging', 'mixture'];

/** Plain-words explanation of each rule, for tooltips and reports. */
export const ruleDescriptions: Record<RuleId, string> = {
  we1: 'One point lies outside a control limit, more than 3 sigma from the centre line.',
  we2: 'Two of three points in a row lie more than 2 sigma from the centre line, on the same side.',
  we3: 'Four of five points in a row lie more than 1 sigma from the centre line, on the same side.',
  we4: 'Eight points in a row lie on the same side of the centre line.',
  trend: 'Six points in a row each rise above the one before, or each fall below it.',
  alternating: 'Fourteen points in a row go up and down in turn, like a saw tooth.',
  hugging: 'Fifteen points in a row stay within 1 sigma of the centre line: less scatter than the limits allow for, often a sign of mixed or edited data.',
  mixture: 'Eight points in a row lie more than 1 sigma from the centre line, on either side, with none near the centre.',
};

const RULE_ORDER: Record<RuleId, number> = { we1: 0, we2: 1, we3: 2, we4: 3, trend: 4, alternating: 5, hugging: 6, mixture: 7 };

/** The rule set a selection stands for, in the order the rules are listed above. */
export function resolveRules(selection: RuleSelection | undefined): RuleId[] {
  if (selection === undefined || selection === 'we') return [...WESTERN_ELECTRIC_RULES];
  if (selection === 'extended') return [...EXTENDED_RULES];
  const unknown = selection.filter((r) => !(r in RULE_ORDER));
  if (unknown.length > 0) throw new RangeError(`unknown run rule: ${unknown.join(', ')}`);
  return [...new Set(selection)].sort((a, b) => RULE_ORDER[a] - RULE_ORDER[b]);
}

/** Orders violations by point, then location before dispersion, then rule. */
export function compareViolations(a: Violation, b: Violation): number {
  return a.index - b.index || (a.chart === b.chart ? 0 : a.chart === 'location' ? -1 : 1) || RULE_ORDER[a.rule] - RULE_ORDER[b.rule];
}

const POPCOUNT = new Uint8Array(32);
for (let i = 1; i < 32; i++) POPCOUNT[i] = (i & 1) + POPCOUNT[i >> 1];

function lastJudged(ring: Int32Array, count: number, length: number): number[] {
  const out = new Array<number>(length);
  for (let j = 0; j < length; j++) out[j] = ring[(count - length + j) & 15];
  return out;
}

/** Span (in judged points, ending at the newest) holding the newest `needed` set bits of `window`. */
function spanOfNewest(window: number, needed: number): number {
  let seen = 0;
  for (let bit = 0; ; bit++) {
    if (window & (1 << bit)) seen++;
    if (seen === needed) return bit + 1;
  }
}

export interface LocationSeries {
  /** The plotted statistic: subgroup means or individual values. */
  values: ArrayLike<number>;
  center: number;
  /** Standard deviation of the plotted statistic: one number, or one per point when sizes vary. */
  sigma: number | ArrayLike<number>;
  /** 1 marks a point that is not judged (excluded). */
  skip: ArrayLike<number> | null;
}

/** Appends the location-chart violations of the selected rules to `out`, in point order. */
export function locationViolations(series: LocationSeries, rules: readonly RuleId[], out: Violation[]): void {
  const on = new Set(rules);
  const r1 = on.has('we1');
  const r2 = on.has('we2');
  const r3 = on.has('we3');
  const r4 = on.has('we4');
  const rTrend = on.has('trend');
  const rAlt = on.has('alternating');
  const rHug = on.has('hugging');
  const rMix = on.has('mixture');
  const { values, center: c, skip } = series;
  const perPoint = typeof series.sigma !== 'number';
  const sigmas = perPoint ? (series.sigma as ArrayLike<number>) : null;
  const constSigma = perPoint ? 0 : (series.sigma as number);
  // The zone lines are computed with the same expressions as the reported limits, so that a point
  // lying exactly on a reported limit compares equal to it.
  let plus1 = c + constSigma;
  let plus2 = c + 2 * constSigma;
  let plus3 = c + 3 * constSigma;
  let minus1 = c - constSigma;
  let minus2 = c - 2 * constSigma;
  let minus3 = c - 3 * constSigma;

  const ring = new Int32Array(16);
  let count = 0;
  let high2 = 0;
  let low2 = 0;
  let high1 = 0;
  let low1 = 0;
  let side = 0;
  let sideRun = 0;
  let rising = 0;
  let falling = 0;
  let lastStep = 0;
  let alternating = 0;
  let inside = 0;
  let outside = 0;
  let previous = 0;
  const n = values.length;
  for (let i = 0; i < n; i++) {
    if (skip !== null && skip[i] === 1) continue;
    const x = values[i];
    if (sigmas !== null) {
      const s = sigmas[i];
      plus1 = c + s;
      plus2 = c + 2 * s;
      plus3 = c + 3 * s;
      minus1 = c - s;
      minus2 = c - 2 * s;
      minus3 = c - 3 * s;
    }
    ring[count & 15] = i;
    count++;

    if (r1 && (x > plus3 || x < minus3)) out.push({ rule: 'we1', chart: 'location', index: i, points: [i] });

    high2 = ((high2 << 1) | (x > plus2 ? 1 : 0)) & 7;
    low2 = ((low2 << 1) | (x < minus2 ? 1 : 0)) & 7;
    if (r2) {
      const w = (high2 & 1) === 1 ? high2 : (low2 & 1) === 1 ? low2 : 0;
      if (POPCOUNT[w] >= 2) out.push({ rule: 'we2', chart: 'location', index: i, points: lastJudged(ring, count, spanOfNewest(w, 2)) });
    }

    high1 = ((high1 << 1) | (x > plus1 ? 1 : 0)) & 31;
    low1 = ((low1 << 1) | (x < minus1 ? 1 : 0)) & 31;
    if (r3) {
      const w = (high1 & 1) === 1 ? high1 : (low1 & 1) === 1 ? low1 : 0;
      if (POPCOUNT[w] >= 4) out.push({ rule: 'we3', chart: 'location', index: i, points: lastJudged(ring, count, spanOfNewest(w, 4)) });
    }

    const s = x > c ? 1 : x < c ? -1 : 0;
    sideRun = s !== 0 && s === side ? sideRun + 1 : s !== 0 ? 1 : 0;
    side = s;
    if (r4 && sideRun >= 8) out.push({ rule: 'we4', chart: 'location', index: i, points: lastJudged(ring, count, 8) });

    if (count > 1) {
      const step = x > previous ? 1 : x < previous ? -1 : 0;
      rising = step === 1 ? rising + 1 : 0;
      falling = step === -1 ? falling + 1 : 0;
      alternating = step !== 0 && step === -lastStep ? alternating + 1 : step !== 0 ? 1 : 0;
      lastStep = step;
      if (rTrend && (rising >= 5 || falling >= 5)) out.push({ rule: 'trend', chart: 'location', index: i, points: lastJudged(ring, count, 6) });
      if (rAlt && alternating >= 13) out.push({ rule: 'alternating', chart: 'location', index: i, points: lastJudged(ring, count, 14) });
    }
    previous = x;

    inside = x <= plus1 && x >= minus1 ? inside + 1 : 0;
    if (rHug && inside >= 15) out.push({ rule: 'hugging', chart: 'location', index: i, points: lastJudged(ring, count, 15) });
    outside = x > plus1 || x < minus1 ? outside + 1 : 0;
    if (rMix && outside >= 8) out.push({ rule: 'mixture', chart: 'location', index: i, points: lastJudged(ring, count, 8) });
  }
}

export interface DispersionSeries {
  /** Ranges, standard deviations or moving ranges. */
  values: ArrayLike<number>;
  ucl: number | ArrayLike<number>;
  lcl: number | ArrayLike<number>;
  /** 1 marks a point that has a dispersion value and is judged. */
  judged: ArrayLike<number>;
}

/** Rule we1 on the dispersion chart: a range, standard deviation or moving range outside its limits. */
export function dispersionViolations(series: DispersionSeries, out: Violation[]): void {
  const { values, judged } = series;
  const uclArr = typeof series.ucl === 'number' ? null : series.ucl;
  const lclArr = typeof series.lcl === 'number' ? null : series.lcl;
  const uclConst = typeof series.ucl === 'number' ? series.ucl : 0;
  const lclConst = typeof series.lcl === 'number' ? series.lcl : 0;
  for (let i = 0; i < values.length; i++) {
    if (judged[i] !== 1) continue;
    const v = values[i];
    const ucl = uclArr === null ? uclConst : uclArr[i];
    const lcl = lclArr === null ? lclConst : lclArr[i];
    if (v > ucl || v < lcl) out.push({ rule: 'we1', chart: 'dispersion', index: i, points: [i] });
  }
}
