// Run rules, evaluated in one pass over the points for both charts: each block of 32 points becomes a
// few bit words, and every pattern is a handful of bitwise operations on them, so the cost per point
// is the same whatever the pattern's length and however many windows overlap.
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
/** 'we': the four Western Electric rules; 'extended': those and the trend, saw-tooth, hugging and mixture rules. */
export const RULE_SETS = ['we', 'extended'] as const;
export type RuleSetId = (typeof RULE_SETS)[number];
export type RuleSelection = RuleSetId | readonly RuleId[];

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

/** Short names of the run rules for tables, markers and alarm lists; the descriptions below explain them in full. */
export const ruleLabels: Record<RuleId, string> = {
  we1: 'Rule 1 · beyond a control limit',
  we2: 'Rule 2 · 2 of 3 beyond 2σ',
  we3: 'Rule 3 · 4 of 5 beyond 1σ',
  we4: 'Rule 4 · 8 on one side',
  trend: 'Trend · 6 rising or falling',
  alternating: 'Saw tooth · 14 alternating',
  hugging: 'Hugging · 15 within 1σ',
  mixture: 'Mixture · 8 avoiding the centre',
};

/** The rule sets in words. */
export const ruleSetLabels: Record<RuleSetId, string> = { we: 'Western Electric rules 1–4', extended: 'Western Electric rules and the extended set' };

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

/** A comparison result used as a 0/1 number without a branch (a branch on random data would
 *  mispredict at every other point). */
const bit = (b: boolean): number => +b;

/**
 * The flags of the points `k` places back (1 ≤ k ≤ 31). In a block word the oldest point of the block
 * is bit 31 and each later point one bit lower, so the points before the block come from the low
 * bits of the previous block's word `prev`.
 */
const back = (w: number, prev: number, k: number): number => (w >>> k) | (prev << (32 - k));

/** At least three of four bit vectors set, bit by bit. */
const atLeastThree = (a: number, b: number, c: number, d: number): number => (a & b & (c | d)) | (c & d & (a | b));

export interface LocationSeries {
  /** The plotted statistic: subgroup means or individual values. */
  values: ArrayLike<number>;
  center: number;
  /** Standard deviation of the plotted statistic: one number, or one per point when sizes vary. */
  sigma: number | ArrayLike<number>;
  /** 1 marks a point that is not judged (excluded). */
  skip: ArrayLike<number> | null;
}

export interface DispersionSeries {
  /** Ranges or standard deviations; null for the moving ranges of the location values, which are
   *  then computed on the way. */
  values: ArrayLike<number> | null;
  ucl: number | ArrayLike<number>;
  lcl: number | ArrayLike<number>;
  /** 1 marks a point that has a dispersion value and is judged; null when every judged point has
   *  one. A moving range is judged when both of its points are. */
  judged: ArrayLike<number> | null;
}

/** The judged points ending at `index`, `length` of them. */
function patternPoints(index: number, length: number, skip: ArrayLike<number> | null): number[] {
  const out = new Array<number>(length);
  if (skip === null) {
    for (let k = 0, i = index - length + 1; k < length; k++, i++) out[k] = i;
    return out;
  }
  let i = index;
  for (let k = length - 1; k >= 0; k--, i--) {
    while (skip[i] === 1) i--;
    out[k] = i;
  }
  return out;
}

/** State of the pass over the points, carried from one block to the next. */
interface Scan {
  values: ArrayLike<number>;
  skip: ArrayLike<number> | null;
  center: number;
  sigma: number;
  sigmas: ArrayLike<number> | null;
  /** Dispersion chart: judged by we1 when `hasSpread`; `spreadValues` null for moving ranges. */
  hasSpread: boolean;
  spreadValues: ArrayLike<number> | null;
  spreadJudged: ArrayLike<number> | null;
  ucl: number;
  lcl: number;
  uclArray: ArrayLike<number> | null;
  lclArray: ArrayLike<number> | null;
  /** Next point to read, the previous judged value and its index. */
  next: number;
  previous: number;
  lastIndex: number;
}

const WORDS = 9;
const [W_A, W_B, W_H1, W_L1, W_H2, W_L2, W_U, W_D, W_R1] = [0, 1, 2, 3, 4, 5, 6, 7, 8];

/**
 * Reads the next (up to) 32 judged points and sets the block's bit words: above / below the centre
 * line, beyond ±1σ, beyond ±2σ, a step up / down, and a dispersion value beyond its limits. Returns
 * how many points the block holds. A function of its own, called once per block, so that the
 * optimiser compiles it whole.
 */
function scanBlock(st: Scan, words: Int32Array, position: Int32Array): number {
  const { values, skip, center: c, sigmas, hasSpread, spreadValues, spreadJudged, uclArray, lclArray } = st;
  const n = values.length;
  // The zone lines use the same expressions as the reported limits, so that a point lying exactly on
  // a reported limit compares equal to it.
  let s = st.sigma;
  let plus1 = c + s, plus2 = c + 2 * s, minus1 = c - s, minus2 = c - 2 * s;
  let ucl = st.ucl;
  let lcl = st.lcl;
  let previous = st.previous;
  let lastIndex = st.lastIndex;
  let i = st.next;
  let A = 0, B = 0, H1 = 0, L1 = 0, H2 = 0, L2 = 0, U = 0, D = 0, R1 = 0;
  let j = 0;
  for (; j < 32 && i < n; i++) {
    if (skip !== null && skip[i] === 1) continue;
    const x = values[i];
    if (sigmas !== null) {
      s = sigmas[i];
      plus1 = c + s; plus2 = c + 2 * s; minus1 = c - s; minus2 = c - 2 * s;
    }
    // Shifting by a constant is markedly cheaper than setting bit j.
    A = (A << 1) | bit(x > c);
    B = (B << 1) | bit(x < c);
    H1 = (H1 << 1) | bit(x > plus1);
    L1 = (L1 << 1) | bit(x < minus1);
    H2 = (H2 << 1) | bit(x > plus2);
    L2 = (L2 << 1) | bit(x < minus2);
    U = (U << 1) | bit(x > previous);
    D = (D << 1) | bit(x < previous);
    if (hasSpread) {
      if (uclArray !== null) ucl = uclArray[i];
      if (lclArray !== null) lcl = lclArray[i];
      if (spreadValues !== null) {
        const d = spreadValues[i];
        R1 = (R1 << 1) | ((bit(d > ucl) | bit(d < lcl)) & (spreadJudged === null ? 1 : spreadJudged[i]));
      } else {
        const d = Math.abs(x - previous);
        R1 = (R1 << 1) | ((bit(d > ucl) | bit(d < lcl)) & bit(lastIndex === i - 1));
      }
    }
    previous = x;
    lastIndex = i;
    position[j++] = i;
  }
  if (j < 32) {
    // Only the last block can be short: align its oldest point with bit 31 like a full block's.
    const gap = 32 - j;
    A <<= gap; B <<= gap; H1 <<= gap; L1 <<= gap; H2 <<= gap; L2 <<= gap; U <<= gap; D <<= gap; R1 <<= gap;
  }
  words[W_A] = A; words[W_B] = B; words[W_H1] = H1; words[W_L1] = L1; words[W_H2] = H2;
  words[W_L2] = L2; words[W_U] = U; words[W_D] = D; words[W_R1] = R1;
  st.next = i;
  st.previous = previous;
  st.lastIndex = lastIndex;
  return j;
}

/**
 * scanBlock for the common case — every point judged, one sigma for all, and a dispersion chart
 * (if any) with fixed limits and a value at every point — without the per-point tests for the other
 * cases. `spreadMode` 0: no dispersion chart, 1: its values, 2: moving ranges computed here (with a
 * lower limit of zero, as moving ranges always have).
 */
function scanBlockFast(st: Scan, words: Int32Array, spreadMode: number): number {
  const { values, center: c, sigma: s, spreadValues, ucl, lcl } = st;
  const plus1 = c + s, plus2 = c + 2 * s, minus1 = c - s, minus2 = c - 2 * s;
  const start = st.next;
  const end = Math.min(values.length, start + 32);
  // Two short loops over the block rather than one: fewer words live at once, none spilled.
  let A = 0, B = 0, H1 = 0, L1 = 0, H2 = 0, L2 = 0;
  for (let i = start; i < end; i++) {
    const x = values[i];
    A = (A << 1) | bit(x > c);
    B = (B << 1) | bit(x < c);
    H1 = (H1 << 1) | bit(x > plus1);
    L1 = (L1 << 1) | bit(x < minus1);
    H2 = (H2 << 1) | bit(x > plus2);
    L2 = (L2 << 1) | bit(x < minus2);
  }
  let previous = st.previous;
  let U = 0, D = 0, R1 = 0;
  if (spreadMode === 2) {
    for (let i = start; i < end; i++) {
      const x = values[i];
      U = (U << 1) | bit(x > previous);
      D = (D << 1) | bit(x < previous);
      // Moving ranges: the lower limit is zero, which no range falls below. The first point has
      // no moving range: |x − NaN| compares false.
      R1 = (R1 << 1) | bit(Math.abs(x - previous) > ucl);
      previous = x;
    }
  } else {
    for (let i = start; i < end; i++) {
      const x = values[i];
      U = (U << 1) | bit(x > previous);
      D = (D << 1) | bit(x < previous);
      previous = x;
    }
    if (spreadMode === 1 && spreadValues !== null) {
      for (let i = start; i < end; i++) {
        const d = spreadValues[i];
        R1 = (R1 << 1) | bit(d > ucl) | bit(d < lcl);
      }
    }
  }
  const j = end - start;
  if (j < 32) {
    const gap = 32 - j;
    A <<= gap; B <<= gap; H1 <<= gap; L1 <<= gap; H2 <<= gap; L2 <<= gap; U <<= gap; D <<= gap; R1 <<= gap;
  }
  words[W_A] = A; words[W_B] = B; words[W_H1] = H1; words[W_L1] = L1; words[W_H2] = H2;
  words[W_L2] = L2; words[W_U] = U; words[W_D] = D; words[W_R1] = R1;
  st.next = end;
  st.previous = previous;
  st.lastIndex = end - 1;
  return j;
}

/**
 * Appends the violations of the selected rules to `out`, ordered by point, location chart before
 * dispersion chart, then rule. The dispersion chart, when given, is judged by rule we1 only.
 *
 * The judged points are taken 32 at a time. One pass sets, per block, a bit word for each point
 * property; every pattern is then a handful of shifts and ANDs of those words, with the previous
 * block's words supplying the points before the block.
 */
export function findViolations(series: LocationSeries, dispersion: DispersionSeries | null, rules: readonly RuleId[], out: Violation[]): void {
  const on = new Set(rules);
  if (on.size === 0) return;
  const { values, skip, center: c } = series;
  const sigma = typeof series.sigma === 'number' ? series.sigma : 0;
  const sigmas = typeof series.sigma === 'number' ? null : series.sigma;
  const spread = on.has('we1') ? dispersion : null;
  const st: Scan = {
    values, skip, center: c, sigma, sigmas,
    hasSpread: spread !== null,
    spreadValues: spread === null ? null : spread.values,
    spreadJudged: spread === null ? null : spread.judged,
    ucl: spread !== null && typeof spread.ucl === 'number' ? spread.ucl : 0,
    lcl: spread !== null && typeof spread.lcl === 'number' ? spread.lcl : 0,
    uclArray: spread === null || typeof spread.ucl === 'number' ? null : spread.ucl,
    lclArray: spread === null || typeof spread.lcl === 'number' ? null : spread.lcl,
    next: 0, previous: NaN, lastIndex: -2,
  };
  const mask = (rule: RuleId): number => (on.has(rule) ? -1 : 0);
  const mWe1 = mask('we1'), mWe2 = mask('we2'), mWe3 = mask('we3'), mWe4 = mask('we4');
  const mTrend = mask('trend'), mAlternating = mask('alternating'), mHugging = mask('hugging'), mMixture = mask('mixture');

  const words = new Int32Array(WORDS);
  const position = new Int32Array(32); // k-th judged point of the block → point index (bit 31 − k)
  // Previous block's words (and the partial ANDs the patterns reuse).
  let pA = 0, pB = 0, pA2 = 0, pB2 = 0, pA4 = 0, pB4 = 0;
  let pH1 = 0, pL1 = 0, pH2 = 0, pL2 = 0;
  let pU = 0, pD = 0, pU2 = 0, pD2 = 0, pZ = 0, pZ2 = 0, pZ4 = 0;
  let pI = 0, pI2 = 0, pI4 = 0, pO = 0, pO2 = 0, pO4 = 0;
  const n = values.length;
  const spreadMode = spread === null ? 0 : spread.values !== null ? 1 : 2;
  const fast = skip === null && sigmas === null && st.uclArray === null && st.lclArray === null && st.spreadJudged === null && !(spreadMode === 2 && st.lcl > 0);
  while (st.next < n) {
    const blockStart = st.next;
    const j = fast ? scanBlockFast(st, words, spreadMode) : scanBlock(st, words, position);
    if (j === 0) break;
    const A = words[W_A], B = words[W_B], H1 = words[W_H1], L1 = words[W_L1], H2 = words[W_H2];
    const L2 = words[W_L2], U = words[W_U], D = words[W_D], R1 = words[W_R1];
    // Beyond a control limit is beyond 2σ too: only those few points are compared with the limits.
    let E1 = 0;
    for (let cand = (H2 | L2) & mWe1; cand !== 0; ) {
      const b = 31 - Math.clz32(cand);
      cand ^= 1 << b;
      const index = fast ? blockStart + 31 - b : position[31 - b];
      const x = values[index];
      const sd = sigmas === null ? sigma : sigmas[index];
      if (x > c + 3 * sd || x < c - 3 * sd) E1 |= 1 << b;
    }
    const valid = j === 32 ? -1 : ~((1 << (32 - j)) - 1);

    const A2 = A & back(A, pA, 1), B2 = B & back(B, pB, 1);
    const A4 = A2 & back(A2, pA2, 2), B4 = B2 & back(B2, pB2, 2);
    const we4 = (A4 & back(A4, pA4, 4)) | (B4 & back(B4, pB4, 4));

    const we2 = (H2 & (back(H2, pH2, 1) | back(H2, pH2, 2))) | (L2 & (back(L2, pL2, 1) | back(L2, pL2, 2)));
    const we3 = (H1 & atLeastThree(back(H1, pH1, 1), back(H1, pH1, 2), back(H1, pH1, 3), back(H1, pH1, 4))) |
      (L1 & atLeastThree(back(L1, pL1, 1), back(L1, pL1, 2), back(L1, pL1, 3), back(L1, pL1, 4)));

    const U2 = U & back(U, pU, 1), D2 = D & back(D, pD, 1);
    const trend = ((U2 & back(U2, pU2, 2)) & back(U, pU, 4)) | ((D2 & back(D2, pD2, 2)) & back(D, pD, 4));
    // Z: this step goes the other way from the step before; thirteen alternating steps are twelve Z in a row.
    const Z = (U & back(D, pD, 1)) | (D & back(U, pU, 1));
    const Z2 = Z & back(Z, pZ, 1);
    const Z4 = Z2 & back(Z2, pZ2, 2);
    const alternating = Z4 & back(Z4, pZ4, 4) & back(Z4, pZ4, 8);

    const I = ~(H1 | L1) & valid; // within ±1σ
    const I2 = I & back(I, pI, 1);
    const I4 = I2 & back(I2, pI2, 2);
    const hugging = I4 & back(I4, pI4, 4) & back(I4, pI4, 8) & back(I2, pI2, 12) & back(I, pI, 14);
    const O = H1 | L1; // beyond ±1σ
    const O2 = O & back(O, pO, 1);
    const O4 = O2 & back(O2, pO2, 2);
    const mixture = O4 & back(O4, pO4, 4);

    const hWe1 = E1, hWe2 = we2 & mWe2, hWe3 = we3 & mWe3, hWe4 = we4 & mWe4;
    const hTrend = trend & mTrend, hAlternating = alternating & mAlternating, hHugging = hugging & mHugging, hMixture = mixture & mMixture;
    let any = (hWe1 | hWe2 | hWe3 | hWe4 | hTrend | hAlternating | hHugging | hMixture | R1) & valid;
    while (any !== 0) {
      const b = 31 - Math.clz32(any); // the oldest point first
      any ^= 1 << b;
      const index = fast ? blockStart + 31 - b : position[31 - b];
      const chart = 'location';
      if ((hWe1 >>> b) & 1) out.push({ rule: 'we1', chart, index, points: [index] });
      if ((hWe2 >>> b) & 1) {
        const side = (H2 >>> b) & 1 ? H2 : L2;
        const span = (back(side, side === H2 ? pH2 : pL2, 1) >>> b) & 1 ? 2 : 3;
        out.push({ rule: 'we2', chart, index, points: patternPoints(index, span, skip) });
      }
      if ((hWe3 >>> b) & 1) {
        const upper = (H1 >>> b) & 1;
        const w = upper ? H1 : L1;
        const pw = upper ? pH1 : pL1;
        let span = 1;
        for (let seen = 1; seen < 4; span++) seen += (back(w, pw, span) >>> b) & 1;
        out.push({ rule: 'we3', chart, index, points: patternPoints(index, span, skip) });
      }
      if ((hWe4 >>> b) & 1) out.push({ rule: 'we4', chart, index, points: patternPoints(index, 8, skip) });
      if ((hTrend >>> b) & 1) out.push({ rule: 'trend', chart, index, points: patternPoints(index, 6, skip) });
      if ((hAlternating >>> b) & 1) out.push({ rule: 'alternating', chart, index, points: patternPoints(index, 14, skip) });
      if ((hHugging >>> b) & 1) out.push({ rule: 'hugging', chart, index, points: patternPoints(index, 15, skip) });
      if ((hMixture >>> b) & 1) out.push({ rule: 'mixture', chart, index, points: patternPoints(index, 8, skip) });
      if ((R1 >>> b) & 1) out.push({ rule: 'we1', chart: 'dispersion', index, points: [index] });
    }

    pA = A; pB = B; pA2 = A2; pB2 = B2; pA4 = A4; pB4 = B4;
    pH1 = H1; pL1 = L1; pH2 = H2; pL2 = L2;
    pU = U; pD = D; pU2 = U2; pD2 = D2; pZ = Z; pZ2 = Z2; pZ4 = Z4;
    pI = I; pI2 = I2; pI4 = I4; pO = O; pO2 = O2; pO4 = O4;
  }
}
