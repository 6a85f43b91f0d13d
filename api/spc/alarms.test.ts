// Which chart signals become alarms: one alarm per pattern episode, however the pattern goes on.
import { describe, expect, it } from 'vitest';
import { buildChart, type ChartInputs, type LotSubgroup } from './chart-assembly';
import { findingsOf } from './alarms';

const HOUR = 3_600_000;
const start = Date.UTC(2026, 0, 5, 6);

/** An X̄–R chart of pairs judged against frozen limits: centre 145 mm, sigma within 2 mm, so σ of X̄ is √2 mm. */
function inputs(means: number[], excludedAt: number[] = [], spread: (i: number) => number = () => 1): ChartInputs {
  const lots: LotSubgroup[] = means.map((m, i) => ({
    lotId: i + 1,
    lotNumber: `T-${String(i).padStart(3, '0')}`,
    producedAt: new Date(start + i * 8 * HOUR),
    shift: 'early',
    values: [m - spread(i) / 2, m + spread(i) / 2],
    lastEnteredAt: new Date(start),
  }));
  return {
    characteristic: {
      id: 1, code: 'T-FLOW', name: 'Test · flow', unit: 'mm', chart_type: 'xbar-r', rule_set: 'we', subgroup_size: 2,
      product_id: 1, product_code: 'T', product_name: 'Test', plant_id: 1, line_id: 1, line_code: 'L1', decimals: 0,
    },
    lots,
    exclusions: new Map(excludedAt.map((i) => [i + 1, 'Ring lifted unevenly'])),
    revisions: [{
      id: 1, revision: 1, chartType: 'xbar-r', center: 145, sigmaWithin: 2, baselineFrom: new Date(start - 30 * 24 * HOUR), baselineTo: new Date(start - HOUR),
      createdAt: new Date(start), createdByName: 'Demo Quality Manager', reason: 'Initial limits',
    }],
    specs: [],
    events: [],
    now: new Date(start + means.length * 8 * HOUR),
  };
}

/** Points alternating just above and just below the centre line, ending below it: no rule fires on them. */
const quiet = (n = 20) => Array.from({ length: n }, (_, i) => (i % 2 ? 144.5 : 145.5));

function alarmsOf(means: number[], excludedAt: number[] = []) {
  const input = inputs(means, excludedAt);
  const { chart } = buildChart(input);
  return { chart, findings: findingsOf(chart, input, null) };
}

describe('one alarm per pattern episode', () => {
  it('keeps a run of eight on one side one episode when a point inside it is excluded', () => {
    // Western Electric Handbook (1956) test 4, eight successive points on one side of the centre line
    // (from memory). An excluded point neither counts towards a run nor breaks it (shared/spc/rules.ts),
    // so the run of eleven here, with its ninth point excluded, is one run of ten judged points.
    const means = [...quiet(), ...Array(11).fill(145.5)];
    const { chart, findings } = alarmsOf(means, [28]);
    expect(chart.violations.filter((v) => v.rule === 'we4').map((v) => v.index)).toEqual([27, 29, 30]);
    expect(findings.filter((f) => f.rule === 'we4').map((f) => f.pointIndex)).toEqual([27]);
  });

  it('raises "two of three beyond 2 sigma" once while the pattern keeps renewing itself, and again after it has ended', () => {
    // Western Electric Handbook (1956) test 2, two of three successive points beyond 2 sigma on one
    // side (from memory; Nelson 1984 rule 5). 148.5 mm lies 2.47 σ of X̄ above 145: beyond 2σ, inside 3σ.
    const high = 148.5;
    const means = [...quiet(), high, high, 145.5, high, 144.5, 145.5, ...quiet(10), high, 145.5, high, ...quiet(6)];
    const { chart, findings } = alarmsOf(means);
    // The chart reports the pattern at 21 (20 and 21), at 23 (21 and 23) and again at 38 (36 and 38).
    expect(chart.violations.filter((v) => v.rule === 'we2').map((v) => v.index)).toEqual([21, 23, 38]);
    expect(findings.filter((f) => f.rule === 'we2').map((f) => f.pointIndex)).toEqual([21, 38]);
    expect(findings.some((f) => f.rule === 'we1')).toBe(false);
  });

  it('still raises each point beyond a control limit as an alarm of its own', () => {
    // 150 mm is 3.54 σ of X̄ above 145: beyond the upper control limit (WE Handbook test 1, from memory).
    const means = [...quiet(), 150, 150, ...quiet(4)];
    const { findings } = alarmsOf(means);
    expect(findings.filter((f) => f.rule === 'we1').map((f) => f.pointIndex)).toEqual([20, 21]);
  });
});

describe('what an alarm says', () => {
  // Frozen centre 145 mm, sigma within 2 mm, pairs: UCL of X̄ = 145 + 3 · 2 / √2 = 149.24 mm; UCL of R =
  // D4 · d2 · σ = 3.267 · 1.128 · 2 = 7.37 mm (ASTM STP 15D / Montgomery, Introduction to Statistical
  // Quality Control, table of factors for n = 2: d2 = 1.128, D4 = 3.267; from memory).
  it('names the figure of the chart the signal is on and compares it with that chart\'s own limit, to the characteristic\'s decimals', () => {
    const means = [...quiet(), 145.5, 150, ...quiet(4)];
    const input = inputs(means, [], (i) => (i === 20 ? 10 : 1));
    const { chart } = buildChart(input);
    const findings = findingsOf(chart, input, null);
    const range = findings.find((f) => f.rule === 'we1' && f.chart === 'dispersion')!;
    expect(range.pointIndex).toBe(20);
    expect(range.statistic).toBeCloseTo(10, 9);
    expect(range.limitValue).toBeCloseTo(7.37, 2);
    expect(range.description).toBe('Subgroup range 10 mm above the upper control limit 7 mm.');
    const mean = findings.find((f) => f.rule === 'we1' && f.chart === 'location')!;
    expect(mean.pointIndex).toBe(21);
    expect(mean.limitValue).toBeCloseTo(149.24, 2);
    expect(mean.description).toBe('Subgroup mean 150 mm above the upper control limit 149 mm.');
  });

  it('never shows a rule identifier or a UTC time in the text', () => {
    const high = 148.5;
    const { findings } = alarmsOf([...quiet(), high, high, ...Array(10).fill(145.5), 150, ...quiet(4)]);
    expect(new Set(findings.map((f) => f.rule)).size).toBeGreaterThan(1);
    for (const f of findings) expect(f.description).not.toMatch(/\bwe[1-4]\b|UTC|T-0/);
  });
});
