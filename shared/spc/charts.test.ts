// Control charts against the textbook formulas with the published constants, and against
// simple-statistics (a general-purpose statistics library) for the subgroup statistics.
import { max, mean, min, sampleStandardDeviation } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { computeChart, pointAt, pointList, type ChartResult } from './charts';
import { SpcInputError } from './errors';

// Constants as printed in the ASTM E2587 table of control chart constants (from memory, see
// constants.test.ts): the limits below are the standard ones, e.g. NIST/SEMATECH e-Handbook §6.3.2:
// X̄ chart X̿ ± A2·R̄ or X̿ ± A3·S̄, R chart D3·R̄ to D4·R̄, S chart B3·S̄ to B4·S̄, individuals X̄ ± 3·MR̄/d2.
const A2_3 = 1.023, D4_3 = 2.574, D3_3 = 0;
const A3_5 = 1.427, B4_5 = 2.089, B3_5 = 0;
const D2_2 = 1.128, D4_2 = 3.267;
const D2 = { 3: 1.693, 4: 2.059, 5: 2.326 } as Record<number, number>;

// Six sets of three 28-day flexural strengths (MPa) of an invented levelling compound.
const flexural = [
  [6.2, 6.5, 6.4], [6.8, 6.6, 6.9], [6.1, 6.3, 6.0],
  [6.5, 6.7, 6.4], [6.6, 6.2, 6.5], [6.4, 6.6, 6.3],
];

function allFinite(result: ChartResult): boolean {
  const nums: unknown[] = [result.location, result.dispersion, result.sigmaWithin, result.sigmaOverall, result.mean, pointList(result)];
  const bad = JSON.stringify(nums, (_k, v) => (typeof v === 'number' && !Number.isFinite(v) ? 'NOT-FINITE' : v));
  return !bad.includes('NOT-FINITE');
}

describe('X̄–R chart', () => {
  const chart = computeChart({ subgroups: flexural });
  const xbarbar = mean(flexural.flat());
  const rbar = mean(flexural.map((g) => max(g) - min(g)));

  it('is chosen for subgroups of three', () => expect(chart.chart).toBe('xbar-r'));
  it('plots the subgroup means and ranges', () => {
    flexural.forEach((g, i) => {
      expect(chart.points.location[i]).toBeCloseTo(mean(g), 12);
      expect(chart.points.dispersion[i]).toBeCloseTo(max(g) - min(g), 12);
    });
  });
  it('has the textbook limits X̿ ± A2·R̄ and D3·R̄ … D4·R̄', () => {
    expect(chart.location.center).toBeCloseTo(xbarbar, 12);
    expect(chart.location.ucl).toBeCloseTo(xbarbar + A2_3 * rbar, 3);
    expect(chart.location.lcl).toBeCloseTo(xbarbar - A2_3 * rbar, 3);
    expect(chart.dispersion.center).toBeCloseTo(rbar, 12);
    expect(chart.dispersion.ucl).toBeCloseTo(D4_3 * rbar, 3);
    expect(chart.dispersion.lcl).toBe(D3_3 * rbar);
    expect(chart.sigmaWithin).toBeCloseTo(rbar / D2[3], 3);
    expect(chart.sigmaOverall).toBeCloseTo(sampleStandardDeviation(flexural.flat()), 12);
  });
  it('gives zone lines at one and two sigma of the mean', () => {
    const s = (chart.sigmaWithin as number) / Math.sqrt(3);
    expect(chart.location.zones?.plusOne).toBeCloseTo(xbarbar + s, 12);
    expect(chart.location.zones?.minusTwo).toBeCloseTo(xbarbar - 2 * s, 12);
  });
  it('returns limits that can be frozen for phase II', () => {
    expect(chart.frozen).toEqual({ chart: 'xbar-r', center: chart.location.center, sigmaWithin: chart.sigmaWithin });
    const next = computeChart({ subgroups: [[6.4, 6.5, 6.3], [7.6, 7.4, 7.5]], frozen: chart.frozen! });
    expect(next.phase).toBe('II');
    expect(next.location.ucl).toBeCloseTo(chart.location.ucl as number, 12);
    expect(next.violations.map((v) => [v.rule, v.index])).toEqual([['we1', 1]]);
  });
});

describe('X̄–S chart', () => {
  const groups = [
    [31.2, 32.0, 30.8, 31.5, 32.3], [30.9, 31.7, 31.1, 32.2, 31.0], [31.8, 32.6, 31.3, 31.9, 32.1],
    [30.5, 31.2, 31.9, 30.8, 31.4], [31.6, 31.1, 32.4, 31.8, 30.9],
  ];
  const chart = computeChart({ subgroups: groups, chart: 'xbar-s' });
  const sbar = mean(groups.map((g) => sampleStandardDeviation(g)));
  const xbarbar = mean(groups.flat());
  it('has the textbook limits X̿ ± A3·S̄ and B3·S̄ … B4·S̄', () => {
    groups.forEach((g, i) => expect(chart.points.dispersion[i]).toBeCloseTo(sampleStandardDeviation(g), 12));
    expect(chart.location.ucl).toBeCloseTo(xbarbar + A3_5 * sbar, 3);
    expect(chart.location.lcl).toBeCloseTo(xbarbar - A3_5 * sbar, 3);
    expect(chart.dispersion.center).toBeCloseTo(sbar, 12);
    expect(chart.dispersion.ucl).toBeCloseTo(B4_5 * sbar, 3);
    expect(chart.dispersion.lcl).toBe(B3_5 * sbar);
  });
  it('is the default above ten values per subgroup', () => {
    const big = Array.from({ length: 4 }, (_, g) => Array.from({ length: 12 }, (_, j) => 30 + ((g * 7 + j * 3) % 5) * 0.2));
    expect(computeChart({ subgroups: big }).chart).toBe('xbar-s');
    const forced = computeChart({ subgroups: big, chart: 'xbar-r' });
    expect(forced.reasons.map((r) => r.code)).toContain('r-chart-large-subgroups');
  });
});

describe('I–MR chart', () => {
  // Flow (spread) diameters in mm of consecutive lots.
  const flow = [142, 145, 141, 147, 144, 143, 146, 140, 145, 144];
  const chart = computeChart({ values: flow });
  const mrbar = mean(flow.slice(1).map((x, i) => Math.abs(x - flow[i])));
  it('is chosen for single values and has limits X̄ ± 3·MR̄/d2 and 0 … D4·MR̄', () => {
    expect(chart.chart).toBe('imr');
    expect(chart.location.center).toBeCloseTo(mean(flow), 12);
    expect(chart.location.ucl).toBeCloseTo(mean(flow) + (3 * mrbar) / D2_2, 2);
    expect(chart.location.lcl).toBeCloseTo(mean(flow) - (3 * mrbar) / D2_2, 2);
    expect(chart.dispersion.center).toBeCloseTo(mrbar, 12);
    expect(chart.dispersion.ucl).toBeCloseTo(D4_2 * mrbar, 2);
    expect(chart.dispersion.lcl).toBe(0);
  });
  it('has no moving range at the first point', () => {
    expect(pointAt(chart, 0).dispersion).toBeNull();
    expect(pointAt(chart, 1).dispersion).toBe(3);
    expect(chart.points.hasDispersion[0]).toBe(0);
  });
  it('uses a Float64Array input without copying it', () => {
    const x = Float64Array.from(flow);
    expect(computeChart({ values: x }).points.location).toBe(x);
  });
  it('leaves excluded points and the moving ranges touching them out of the estimate', () => {
    const spiky = [...flow];
    spiky[4] = 190; // a miscalibrated measurement, assignable cause found
    const kept = spiky.filter((_, i) => i !== 4);
    const mrs = spiky.slice(1).map((x, i) => Math.abs(x - spiky[i])).filter((_, i) => i !== 3 && i !== 4);
    const c = computeChart({ values: spiky, excluded: [4] });
    expect(c.location.center).toBeCloseTo(mean(kept), 12);
    expect(c.dispersion.center).toBeCloseTo(mean(mrs), 12);
    expect(c.sigmaOverall).toBeCloseTo(sampleStandardDeviation(kept), 12);
    expect(c.points.location[4]).toBe(190);
    expect(pointAt(c, 4).excluded).toBe(true);
    expect(c.violations.filter((v) => v.index === 4 || v.index === 5)).toEqual([]);
    const unexcluded = computeChart({ values: spiky });
    expect(unexcluded.violations.some((v) => v.index === 4 && v.rule === 'we1')).toBe(true);
  });
  it('charts subgrouped values as individuals when asked to', () => {
    const c = computeChart({ subgroups: [[1, 2], [3, 4]], chart: 'imr' });
    expect(c.subgroupCount).toBe(4);
    expect(c.reasons.map((r) => r.code)).toContain('individuals-from-subgroups');
  });
});

describe('variable subgroup sizes', () => {
  const groups = [[10.1, 10.4, 9.9], [10.2, 9.8, 10.0, 10.5, 10.1], [9.7, 10.3, 10.0, 10.2], [10.0, 10.6, 10.1]];
  const chart = computeChart({ subgroups: groups });
  const sigma = mean(groups.map((g) => (max(g) - min(g)) / D2[g.length]));
  const grand = mean(groups.flat());
  it('estimates sigma within as the mean of Rᵢ/d2(nᵢ) and weights the grand mean by size', () => {
    expect(chart.sigmaWithin).toBeCloseTo(sigma, 3);
    expect(chart.location.center).toBeCloseTo(grand, 12);
    expect(chart.subgroupSize).toBeNull();
  });
  it('gives each point limits for its own size', () => {
    groups.forEach((g, i) => {
      const p = pointAt(chart, i);
      expect(p.size).toBe(g.length);
      expect(p.locationLimits.ucl).toBeCloseTo(grand + (3 * (chart.sigmaWithin as number)) / Math.sqrt(g.length), 12);
      expect(p.dispersionLimits.center).toBeCloseTo((chart.sigmaWithin as number) * D2[g.length], 2);
    });
    expect(chart.limitsSubgroupSize).toBe(3);
  });
  it('accepts flat values with a size per subgroup', () => {
    const flat = computeChart({ values: groups.flat(), sizes: groups.map((g) => g.length) });
    expect(flat.sigmaWithin).toBe(chart.sigmaWithin);
    expect(flat.points.perPoint?.locationUcl).toEqual(chart.points.perPoint?.locationUcl);
  });
  it('judges each point against its own limits, a point exactly on its limit not being beyond it', () => {
    // Frozen centre 10 and sigma within 2: the X̄ limits are 10 ± 6/√n, i.e. 13 for n = 4 and 11.5 for n = 16.
    const c = computeChart({
      subgroups: [[13, 13, 13, 13], Array(16).fill(11.5), [13.25, 13.25, 13.25, 13.25], Array(16).fill(11.6)],
      frozen: { chart: 'xbar-s', center: 10, sigmaWithin: 2 },
      rules: ['we1'],
    });
    expect([0, 1, 2, 3].map((i) => pointAt(c, i).locationLimits.ucl)).toEqual([13, 11.5, 13, 11.5]);
    // The subgroups of 16 identical values also fall below their S chart LCL, (c4 − 3·√(1 − c4²))·σ > 0.
    expect(c.violations.map((v) => [v.chart, v.index])).toEqual([['dispersion', 1], ['location', 2], ['location', 3], ['dispersion', 3]]);
  });
  it('plots a single-value subgroup without a range', () => {
    const c = computeChart({ subgroups: [[1, 2, 3], [2], [2, 4, 3]] });
    expect(pointAt(c, 1).dispersion).toBeNull();
    expect(pointAt(c, 1).dispersionLimits.ucl).toBeNull();
    expect(c.reasons.map((r) => r.code)).toContain('single-value-subgroups');
  });
});

describe('degenerate input gives a defined result and a reason', () => {
  it('no values', () => {
    const c = computeChart({ values: [] });
    expect(c.subgroupCount).toBe(0);
    expect(c.location.center).toBeNull();
    expect(c.reasons.map((r) => r.code)).toEqual(['no-data']);
    expect(allFinite(c)).toBe(true);
  });
  it('a single point', () => {
    const c = computeChart({ values: [31.5] });
    expect(c.location.center).toBe(31.5);
    expect(c.location.ucl).toBeNull();
    expect(c.sigmaWithin).toBeNull();
    expect(c.reasons.map((r) => r.code)).toEqual(expect.arrayContaining(['no-sigma-within', 'no-sigma-overall']));
    expect(allFinite(c)).toBe(true);
  });
  it('all values equal', () => {
    const c = computeChart({ subgroups: [[5, 5, 5], [5, 5, 5], [5, 5, 5]] });
    expect(c.sigmaWithin).toBe(0);
    expect(c.location.ucl).toBe(5);
    expect(c.location.lcl).toBe(5);
    expect(c.violations).toEqual([]);
    expect(c.rules).toEqual(['we1']);
    expect(c.reasons.map((r) => r.code)).toContain('zero-sigma-within');
    expect(allFinite(c)).toBe(true);
  });
  it('every point excluded', () => {
    const c = computeChart({ values: [1, 2, 3], excluded: [0, 1, 2] });
    expect(c.location.center).toBeNull();
    expect(c.reasons.map((r) => r.code)).toContain('all-excluded');
    expect(allFinite(c)).toBe(true);
  });
  it('programming errors throw', () => {
    expect(() => computeChart({ values: [1, Number.NaN] })).toThrow(SpcInputError);
    expect(() => computeChart({ values: [1, Infinity, 2] })).toThrow(/value 1/);
    expect(() => computeChart({ values: [1, 2, 3], sizes: [2, 2] })).toThrow(SpcInputError);
    expect(() => computeChart({ values: [1, 2], excluded: [5] })).toThrow(SpcInputError);
    expect(() => computeChart({ values: [1, 2], frozen: { chart: 'imr', center: 1, sigmaWithin: -1 } })).toThrow(SpcInputError);
    expect(() => computeChart({ values: [1, 2], chart: 'xbar-r', frozen: { chart: 'imr', center: 1, sigmaWithin: 1 } })).toThrow(SpcInputError);
  });
});
