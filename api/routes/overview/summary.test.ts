import { describe, expect, it } from 'vitest';
import type { CharacteristicChart, ChartPointRecord } from '@shared/schemas/charts';
import { indexBelow } from '@shared/schemas/overview';
import { summarise, TREND_POINTS, type OverviewBase } from './summary';

const base: OverviewBase = { id: 1, code: 'T-FLOW', name: 'Test · flow', unit: 'mm', decimals: 0, chartType: 'xbar-r', productCode: 'T', productName: 'Test', productFamily: 'levelling', lineCode: 'L1', lineName: 'Line 1' };
const day = 86_400_000;
const end = Date.UTC(2026, 11, 1);

function chart(count: number, opts: { violationsAt?: number[]; outOfSpecAt?: number[]; ucl?: number | null; source?: 'trial' | 'frozen'; cpk?: number | null } = {}): CharacteristicChart {
  const points = Array.from({ length: count }, (_, i): ChartPointRecord => ({
    index: i, lotId: i + 1, lotNumber: `L-${i}`, producedAt: new Date(end - (count - 1 - i) * day).toISOString(), shift: 'early', n: 2, values: [145, 145],
    location: 145, dispersion: 0, center: 145, ucl: 149, lcl: 141, dispersionUcl: 7, dispersionLcl: 0, excluded: false, exclusionReason: null,
    outOfSpec: (opts.outOfSpecAt ?? []).includes(i), rules: [],
  }));
  return {
    window: { period: 'all', from: null, to: null, limitsFrom: null },
    characteristic: {} as CharacteristicChart['characteristic'],
    spec: { lsl: 135, usl: 155, target: 145, revision: 1 },
    limits: { source: opts.source ?? 'trial', location: { center: 145, ucl: opts.ucl === undefined ? 149 : opts.ucl, lcl: opts.ucl === null ? null : 141, sigma: 1 } } as CharacteristicChart['limits'],
    points,
    violations: (opts.violationsAt ?? []).map((index) => ({ rule: 'we1', chart: 'location', index, points: [index], description: 'x' })),
    events: [],
    capability: opts.cpk === undefined ? null : ({ cpk: opts.cpk, cpkCi95: opts.cpk === null ? null : [opts.cpk - 0.1, opts.cpk + 0.1], preliminary: false, subgroupCount: count } as CharacteristicChart['capability']),
    reasons: [],
  };
}

const from = new Date(end - 29.5 * day);

describe('overview summary of one characteristic', () => {
  it('counts only the signals of the period', () => {
    const full = chart(100, { violationsAt: [10, 20, 95] });
    const item = summarise(base, full, chart(30, { cpk: 1.5 }), from, 0);
    expect(item).toMatchObject({ controlState: 'signal', signals: 1, pointsInPeriod: 30, cpk: 1.5, attention: ['Run-rule signal at 1 point in the period'] });
    const calm = summarise(base, chart(100, { violationsAt: [10, 20] }), chart(30, { cpk: 1.5 }), from, 0);
    expect(calm).toMatchObject({ controlState: 'in-control', signals: 0, attention: [], attentionScore: 0 });
  });

  it('says "not enough data" without limits, with fewer than 20 trial points, or with no lot in the period', () => {
    expect(summarise(base, chart(100, { ucl: null }), chart(30), from, 0).controlState).toBe('not-enough-data');
    expect(summarise(base, chart(12), chart(12), from, 0).controlState).toBe('not-enough-data');
    expect(summarise(base, chart(12, { source: 'frozen' }), chart(12), from, 0).controlState).toBe('in-control');
    const old = chart(100);
    old.points = old.points.slice(0, 50);
    expect(summarise(base, old, chart(0), from, 0)).toMatchObject({ controlState: 'not-enough-data', attention: ['No lot in the period'], latest: { lotNumber: 'L-49' } });
  });

  it('ranks an out-of-specification latest lot above alarms, signals and a low Cpk', () => {
    const latestOut = summarise(base, chart(100, { outOfSpecAt: [99] }), chart(30, { cpk: 1.5 }), from, 0);
    const alarmsAndSignal = summarise(base, chart(100, { violationsAt: [98] }), chart(30, { cpk: 1.5 }), from, 2);
    const lowCpk = summarise(base, chart(100), chart(30, { cpk: 0.8 }), from, 0);
    const marginal = summarise(base, chart(100), chart(30, { cpk: 1.2 }), from, 0);
    expect(latestOut.attention).toEqual(['Latest lot L-99 is outside the specification']);
    expect(alarmsAndSignal.attention).toEqual(['2 open alarms', 'Run-rule signal at 1 point in the period']);
    expect(lowCpk.attention).toEqual(['Cpk 0.80 is below 1.00']);
    expect(marginal.attention).toEqual(['Cpk 1.20 is below 1.33']);
    const order = [marginal, lowCpk, alarmsAndSignal, latestOut].sort((a, b) => b.attentionScore - a.attentionScore);
    expect(order.map((i) => i.attention[0])).toEqual([latestOut.attention[0], alarmsAndSignal.attention[0], lowCpk.attention[0], marginal.attention[0]]);
  });

  it('keeps the trend to the newest points of the period, with their flags', () => {
    const item = summarise(base, chart(100, { violationsAt: [99], outOfSpecAt: [98] }), chart(30), from, 0);
    expect(item.trend).toHaveLength(Math.min(30, TREND_POINTS));
    expect(item.trend.at(-1)).toEqual({ location: 145, signal: true, outOfSpec: false });
    expect(item.trend.at(-2)).toEqual({ location: 145, signal: false, outOfSpec: true });
  });

  it('compares Cpk unrounded and prints it to the decimals that show what was compared', () => {
    // Common practice: 1.33 for a capable process, 1.00 the minimum.
    expect(summarise(base, chart(100), chart(30, { cpk: 1.3271 }), from, 0).attention).toEqual(['Cpk 1.327 is below 1.33']);
    expect(summarise(base, chart(100), chart(30, { cpk: 0.99995 }), from, 0).attention).toEqual(['Cpk 0.99995 is below 1.00']);
    expect(summarise(base, chart(100), chart(30, { cpk: 1.33 }), from, 0).attention).toEqual([]);
    expect(summarise(base, chart(100), chart(30, { cpk: 1.2 }), from, 0).attention).toEqual(['Cpk 1.20 is below 1.33']);
    expect(indexBelow(1.32999, 1.33)).toBe('1.32999');
    expect(indexBelow(1.32999999, 1.33)).toBe('1.329999');
  });

  it('never says "in control" beside an open alarm', () => {
    const item = summarise(base, chart(100), chart(30, { cpk: 1.5 }), from, 1);
    expect(item.controlState).toBe('alarms-open');
    expect(item.attention).toEqual(['1 open alarm']);
    expect(summarise(base, chart(100), chart(30, { cpk: 1.5 }), from, 0).controlState).toBe('in-control');
    // A signal in the period still reads as a signal.
    expect(summarise(base, chart(100, { violationsAt: [99] }), chart(30, { cpk: 1.5 }), from, 1).controlState).toBe('signal');
  });

  it('gives no capability, and no interval, from a single lot', () => {
    const one = summarise(base, chart(100), chart(1, { cpk: 2.4 }), from, 0);
    expect(one).toMatchObject({ cpk: null, cpkCi95: null, capabilityEnough: false });
    const two = summarise(base, chart(100), chart(2, { cpk: 0.6 }), from, 0);
    expect(two).toMatchObject({ cpk: 0.6, capabilityEnough: true, attention: ['Cpk 0.60 is below 1.00'] });
    expect(two.cpkCi95).toEqual([0.5, 0.7]);
  });

  it('marks on the trend every signal and every lot outside the specification that the card counts, however long the period', () => {
    const long = new Date(end - 299.5 * day);
    const item = summarise(base, chart(300, { violationsAt: [5, 150, 151], outOfSpecAt: [200] }), chart(300), long, 0);
    expect(item.signals).toBe(3);
    expect(item.outOfSpecCount).toBe(1);
    expect(item.trend.length).toBeLessThanOrEqual(TREND_POINTS);
    // 150 and 151 may share a group; 5 and 150 cannot.
    expect(item.trend.filter((t) => t.signal).length).toBeGreaterThanOrEqual(2);
    expect(item.trend.filter((t) => t.outOfSpec)).toHaveLength(1);
    expect(item.trend.slice(0, 2).map((t) => t.signal)).toEqual([false, true]);
  });
});
