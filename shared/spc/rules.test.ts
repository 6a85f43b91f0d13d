// Run rules on hand-built sequences. The rule definitions are those of the Western Electric
// "Statistical Quality Control Handbook" (1956) for we1–we4 and Nelson, Journal of Quality
// Technology 16(4) (1984) for the extended four; the handling of ties, of points exactly on a line and
// of repeated signals follows the conventions written at the top of rules.ts.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { computeChart } from './charts';
import { EXTENDED_RULES, findViolations, resolveRules, ruleDescriptions, type RuleId, type Violation } from './rules';

/** Violations of a sequence judged against centre 0 and sigma 1. */
function judge(values: number[], rules: readonly RuleId[] = EXTENDED_RULES, skip: number[] | null = null): Violation[] {
  const out: Violation[] = [];
  const mask = skip === null ? null : Uint8Array.from(values, (_, i) => (skip.includes(i) ? 1 : 0));
  findViolations({ values: Float64Array.from(values), center: 0, sigma: 1, skip: mask }, null, rules, out);
  return out;
}

const only = (vs: Violation[], rule: RuleId) => vs.filter((v) => v.rule === rule).map((v) => ({ index: v.index, points: v.points }));

describe('rule we1: one point beyond 3 sigma', () => {
  it('flags points beyond either limit and nothing else', () => {
    expect(only(judge([0, 3.2, 0, -3.01, 2.9], ['we1']), 'we1')).toEqual([
      { index: 1, points: [1] },
      { index: 3, points: [3] },
    ]);
  });
  it('does not flag a point exactly on a limit', () => {
    expect(judge([3, -3, 3, -3], ['we1'])).toEqual([]);
    expect(only(judge([3.000001], ['we1']), 'we1')).toEqual([{ index: 0, points: [0] }]);
  });
});

describe('rule we2: two of three beyond 2 sigma on one side', () => {
  it('flags the second point, with the pattern from the first', () => {
    expect(only(judge([2.5, 0, 2.1], ['we2']), 'we2')).toEqual([{ index: 2, points: [0, 1, 2] }]);
    expect(only(judge([0, 2.5, 2.1], ['we2']), 'we2')).toEqual([{ index: 2, points: [1, 2] }]);
  });
  it('ignores patterns that straddle the centre line', () => {
    expect(judge([2.5, -2.5, -0.5, 2.5, -2.5], ['we2'])).toEqual([]);
    // The same side two points apart still counts, whatever lies between.
    expect(only(judge([2.5, -2.5, 2.5], ['we2']), 'we2')).toEqual([{ index: 2, points: [0, 1, 2] }]);
  });
  it('does not count points exactly on the 2 sigma line', () => {
    expect(judge([2, 2.5, 2], ['we2'])).toEqual([]);
  });
  it('flags again at each further point that completes an overlapping window', () => {
    expect(only(judge([-2.2, -2.4, -2.6], ['we2']), 'we2')).toEqual([
      { index: 1, points: [0, 1] },
      { index: 2, points: [1, 2] },
    ]);
  });
  it('needs the newest point beyond: two beyond then an ordinary point is not a new signal', () => {
    expect(only(judge([2.5, 2.5, 0.1], ['we2']), 'we2').map((v) => v.index)).toEqual([1]);
  });
});

describe('rule we3: four of five beyond 1 sigma on one side', () => {
  it('flags the fourth point beyond, with the pattern from the first of the four', () => {
    expect(only(judge([1.5, 1.2, 0.5, 1.1, 1.9], ['we3']), 'we3')).toEqual([{ index: 4, points: [0, 1, 2, 3, 4] }]);
    expect(only(judge([0, 1.5, 1.2, 1.1, 1.9], ['we3']), 'we3')).toEqual([{ index: 4, points: [1, 2, 3, 4] }]);
  });
  it('ignores points beyond 1 sigma on the other side', () => {
    expect(judge([1.5, -1.2, -1.5, 1.1, 1.9], ['we3'])).toEqual([]);
    expect(only(judge([1.5, 1.2, -1.5, 1.1, 1.9], ['we3']), 'we3')).toEqual([{ index: 4, points: [0, 1, 2, 3, 4] }]);
  });
  it('does not count points exactly on the 1 sigma line', () => {
    expect(judge([1.5, 1, 1.2, 1, 1.9], ['we3'])).toEqual([]);
    expect(only(judge([1.5, 1, 1.2, 1.0001, 1.9], ['we3']), 'we3').map((v) => v.index)).toEqual([4]);
  });
});

describe('rule we4: eight in a row on one side', () => {
  it('flags the eighth point and each further one', () => {
    const v = [0.1, 0.2, 0.3, 0.1, 0.5, 0.2, 0.1, 0.4, 0.3];
    expect(only(judge(v, ['we4']), 'we4')).toEqual([
      { index: 7, points: [0, 1, 2, 3, 4, 5, 6, 7] },
      { index: 8, points: [1, 2, 3, 4, 5, 6, 7, 8] },
    ]);
  });
  it('is broken by a point on the centre line or across it', () => {
    expect(judge([-1, -1, -1, 0, -1, -1, -1, -1], ['we4'])).toEqual([]);
    expect(judge([-1, -1, -1, 0.2, -1, -1, -1, -1], ['we4'])).toEqual([]);
    expect(only(judge([-1, -1, -1, -1, -1, -1, -1, -1], ['we4']), 'we4').map((v) => v.index)).toEqual([7]);
  });
});

describe('extended rules', () => {
  it('trend: six points in a row rising (five rises), or falling', () => {
    expect(only(judge([0, 0.1, 0.2, 0.3, 0.4, 0.5], ['trend']), 'trend')).toEqual([{ index: 5, points: [0, 1, 2, 3, 4, 5] }]);
    expect(only(judge([0.9, 0.5, 0.1, -0.1, -0.5, -0.9, -1], ['trend']), 'trend').map((v) => v.index)).toEqual([5, 6]);
    expect(judge([0, 0.1, 0.2, 0.3, 0.4], ['trend'])).toEqual([]);
  });
  it('trend: an equal neighbour ends the run', () => {
    expect(judge([0, 0.1, 0.2, 0.2, 0.3, 0.4, 0.5], ['trend'])).toEqual([]);
  });
  it('alternating: fourteen points going up and down in turn', () => {
    const saw = Array.from({ length: 14 }, (_, i) => (i % 2 === 0 ? 0.2 : -0.2));
    expect(only(judge(saw, ['alternating']), 'alternating')).toEqual([{ index: 13, points: Array.from({ length: 14 }, (_, i) => i) }]);
    expect(judge(saw.slice(0, 13), ['alternating'])).toEqual([]);
    const broken = [...saw];
    broken[7] = broken[6]; // a tie in the middle
    expect(judge(broken, ['alternating'])).toEqual([]);
  });
  it('alternating: does not need to cross the centre line', () => {
    const saw = Array.from({ length: 15 }, (_, i) => (i % 2 === 0 ? 2.5 : 2.4));
    expect(only(judge(saw, ['alternating']), 'alternating').map((v) => v.index)).toEqual([13, 14]);
  });
  it('hugging: fifteen in a row within 1 sigma, the 1 sigma line included', () => {
    const calm = Array.from({ length: 15 }, (_, i) => (i % 3) * 0.5 - 0.5);
    calm[4] = 1;
    calm[9] = -1;
    expect(only(judge(calm, ['hugging']), 'hugging')).toEqual([{ index: 14, points: Array.from({ length: 15 }, (_, i) => i) }]);
    calm[9] = -1.01;
    expect(judge(calm, ['hugging'])).toEqual([]);
  });
  it('mixture: eight in a row beyond 1 sigma on either side', () => {
    const split = [1.5, -1.5, 1.2, -2.1, 1.1, -1.3, 2.5, -1.6];
    expect(only(judge(split, ['mixture']), 'mixture')).toEqual([{ index: 7, points: [0, 1, 2, 3, 4, 5, 6, 7] }]);
    split[3] = -1; // on the 1 sigma line: not beyond
    expect(judge(split, ['mixture'])).toEqual([]);
  });
});

describe('excluded points', () => {
  it('are skipped: they neither count towards nor break a pattern', () => {
    const v = [0.5, 0.5, 0.5, -3.5, 0.5, 0.5, 0.5, 0.5, 0.5];
    expect(only(judge(v, ['we1', 'we4'], [3]), 'we4')).toEqual([{ index: 8, points: [0, 1, 2, 4, 5, 6, 7, 8] }]);
    expect(only(judge(v, ['we1', 'we4'], [3]), 'we1')).toEqual([]);
  });
});

describe('rule selection', () => {
  it("'we' is the four Western Electric rules and 'extended' all eight", () => {
    expect(resolveRules('we')).toEqual(['we1', 'we2', 'we3', 'we4']);
    expect(resolveRules(undefined)).toEqual(['we1', 'we2', 'we3', 'we4']);
    expect(resolveRules('extended')).toEqual(['we1', 'we2', 'we3', 'we4', 'trend', 'alternating', 'hugging', 'mixture']);
    expect(resolveRules(['mixture', 'we1', 'we1'])).toEqual(['we1', 'mixture']);
    expect(() => resolveRules(['we9' as RuleId])).toThrow(RangeError);
  });
  it('every rule has a plain-words description', () => {
    for (const r of EXTENDED_RULES) expect(ruleDescriptions[r].length).toBeGreaterThan(20);
  });
});

// A direct transcription of the rule definitions, one window at a time, to check the block-wise
// implementation across block boundaries, overlapping windows and exclusions.
function naive(values: number[], skip: Set<number>): Array<{ rule: RuleId; index: number; points: number[] }> {
  const kept = values.map((x, i) => ({ x, i })).filter((p) => !skip.has(p.i));
  const found: Array<{ rule: RuleId; index: number; points: number[] }> = [];
  const last = (k: number, m: number) => kept.slice(k - m + 1, k + 1);
  for (let k = 0; k < kept.length; k++) {
    const { x, i } = kept[k];
    const add = (rule: RuleId, pts: Array<{ i: number }>) => found.push({ rule, index: i, points: pts.map((p) => p.i) });
    if (x > 3 || x < -3) add('we1', [kept[k]]);
    for (const [rule, width, needed, limit] of [['we2', 3, 2, 2], ['we3', 5, 4, 1]] as const) {
      for (const sign of [1, -1]) {
        if (!(sign * x > limit)) continue;
        const win = last(k, Math.min(width, k + 1));
        const beyond = win.filter((p) => sign * p.x > limit);
        if (beyond.length >= needed) {
          const first = beyond[beyond.length - needed];
          add(rule, win.slice(win.indexOf(first)));
        }
      }
    }
    const run = (m: number, test: (p: { x: number }) => boolean) => k + 1 >= m && last(k, m).every(test);
    if (run(8, (p) => p.x > 0) || run(8, (p) => p.x < 0)) add('we4', last(k, 8));
    if (k >= 5) {
      const w = last(k, 6);
      const steps = w.slice(1).map((p, j) => Math.sign(p.x - w[j].x));
      if (steps.every((s) => s === 1) || steps.every((s) => s === -1)) add('trend', w);
    }
    if (k >= 13) {
      const w = last(k, 14);
      const steps = w.slice(1).map((p, j) => Math.sign(p.x - w[j].x));
      if (steps.every((s, j) => s !== 0 && (j === 0 || s === -steps[j - 1]))) add('alternating', w);
    }
    if (run(15, (p) => Math.abs(p.x) <= 1)) add('hugging', last(k, 15));
    if (run(8, (p) => Math.abs(p.x) > 1)) add('mixture', last(k, 8));
  }
  return found;
}

describe('block-wise evaluation agrees with the rule definitions', () => {
  // Values on and around every zone line, so that ties and exact hits are frequent.
  const level = fc.constantFrom(-3.5, -3, -2.5, -2, -1.5, -1, -0.5, 0, 0.5, 1, 1.5, 2, 2.5, 3, 3.5);
  it('on random sequences with exclusions, across block boundaries', () => {
    fc.assert(
      fc.property(fc.array(level, { minLength: 0, maxLength: 140 }), fc.array(fc.nat(139), { maxLength: 6 }), (values, excl) => {
        const skip = new Set(excl.filter((i) => i < values.length));
        const expected = naive(values, skip);
        const order = new Map(EXTENDED_RULES.map((r, k) => [r, k]));
        expected.sort((a, b) => a.index - b.index || (order.get(a.rule) ?? 0) - (order.get(b.rule) ?? 0));
        const actual = judge(values, EXTENDED_RULES, skip.size > 0 ? [...skip] : null).map(({ rule, index, points }) => ({ rule, index, points }));
        expect(actual).toEqual(expected);
      }),
      { numRuns: 400 },
    );
  });
  it('the same on the fast path (one sigma, nothing excluded) as on the general one, dispersion included', () => {
    fc.assert(
      fc.property(fc.array(level, { minLength: 1, maxLength: 140 }), (values) => {
        const x = Float64Array.from(values);
        const mr = { values: null, ucl: 3.5, lcl: 0, judged: null };
        const fast: Violation[] = [];
        findViolations({ values: x, center: 0, sigma: 1, skip: null }, mr, EXTENDED_RULES, fast);
        const general: Violation[] = [];
        findViolations({ values: x, center: 0, sigma: new Float64Array(x.length).fill(1), skip: null }, { ...mr, ucl: new Float64Array(x.length).fill(3.5) }, EXTENDED_RULES, general);
        expect(fast).toEqual(general);
        // The moving ranges beyond 3.5, by their definition.
        const expected = values.flatMap((v, i) => (i > 0 && Math.abs(v - values[i - 1]) > 3.5 ? [i] : []));
        expect(fast.filter((v) => v.chart === 'dispersion').map((v) => v.index)).toEqual(expected);
      }),
      { numRuns: 300 },
    );
  });
  it('on long runs that cross several 32-point blocks', () => {
    const v = Array.from({ length: 100 }, (_, i) => (i < 70 ? 0.5 : -0.5));
    const we4 = only(judge(v, ['we4']), 'we4').map((x) => x.index);
    expect(we4).toEqual([...Array.from({ length: 63 }, (_, i) => i + 7), ...Array.from({ length: 23 }, (_, i) => i + 77)]);
  });
});

describe('rules on a chart', () => {
  it('apply rule we1 to the dispersion chart and order violations by point', () => {
    // Phase II against frozen I–MR limits: centre 10, sigma 1, so the MR chart's UCL is D4(2)·d2(2) = 3.686.
    const chart = computeChart({ values: [10, 10.5, 14, 10, 10.2], frozen: { chart: 'imr', center: 10, sigmaWithin: 1 } });
    expect(chart.violations.map((v) => [v.rule, v.chart, v.index])).toEqual([
      ['we1', 'location', 2],
      ['we1', 'dispersion', 3],
    ]);
  });
});
