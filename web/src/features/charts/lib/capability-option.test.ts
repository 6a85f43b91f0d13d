import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import type { CapabilityResult } from '@shared/spc';
import { buildCapabilityOption, histogram } from './capability-option';

const jStat = createRequire(import.meta.url)('jstat') as { normal: { pdf(x: number, mean: number, sd: number): number } };

// Flow readings in whole millimetres, as the lab reports them.
const values = Array.from({ length: 500 }, (_, i) => 145 + Math.round(3 * Math.sin(i * 1.7) + 2 * Math.cos(i * 0.37)));
const mean = values.reduce((a, b) => a + b, 0) / values.length;
const sd = Math.sqrt(values.reduce((a, v) => a + (v - mean) ** 2, 0) / (values.length - 1));
const capability = { mean, sigmaOverall: sd, lsl: 135, usl: 155, target: 145 } as CapabilityResult;

describe('capability histogram', () => {
  it('counts every value once, in bins a whole number of the reading step wide', () => {
    const h = histogram(values, 0);
    expect(h.counts.reduce((a, b) => a + b, 0)).toBe(values.length);
    expect(Number.isInteger(h.width)).toBe(true);
    // Bin edges fall half a step off the readings, so no reading sits on an edge.
    for (const v of values) expect(((v - h.start) / h.width) % 1).not.toBe(0);
  });

  it('scales the fitted normal curve to the bars: the curve is the normal density (jstat) times n and the bin width', () => {
    const option = buildCapabilityOption(values, capability, 'mm', 0);
    const series = option.series as { type: string; data: [number, number][] }[];
    const curve = series.find((s) => s.type === 'line')!.data;
    const width = histogram(values, 0).width;
    for (const [x, y] of curve.filter((_, i) => i % 10 === 0)) expect(y).toBeCloseTo(values.length * width * jStat.normal.pdf(x, mean, sd), 9);
  });

  it('draws the specification limits and the target as labelled lines', () => {
    const option = buildCapabilityOption(values, capability, 'mm', 0);
    const bars = (option.series as { type: string; markLine?: { data: { xAxis: number; label: { formatter: string } }[] } }[]).find((s) => s.type === 'bar')!;
    expect(bars.markLine!.data.map((d) => [d.xAxis, d.label.formatter])).toEqual([
      [135, 'LSL 135'],
      [155, 'USL 155'],
      [145, 'Target 145'],
    ]);
  });
});
