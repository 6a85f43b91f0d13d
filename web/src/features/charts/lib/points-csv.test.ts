import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import type { CharacteristicChart } from '@shared/schemas/charts';
import { pointsCsv } from './points-csv';

const chart = {
  characteristic: { id: 1, code: 'T-RC28', name: 'Test · compressive strength', unit: 'MPa', chartType: 'xbar-r', ruleSet: 'we', subgroupSize: 3, productCode: 'T', productName: 'Test', lineCode: 'L1', decimals: 1 },
  points: [
    { index: 0, lotId: 1, lotNumber: 'L1-1', producedAt: '2026-07-01T05:00:00.000Z', shift: 'early', n: 3, values: [30.1, 30.5, 29.8], location: 30.133333333333336, dispersion: 0.6999999999999993, ucl: 31.849999999999994, lcl: 29, dispersionUcl: 1.8, dispersionLcl: 0, excluded: false, exclusionReason: null, outOfSpec: false, rules: ['we1', 'we2'] },
    { index: 1, lotId: 2, lotNumber: 'L1-2', producedAt: '2026-01-01T14:00:00.000Z', shift: null, n: 2, values: [24, 25.5], location: 24.75, dispersion: 1.5, ucl: 31.2, lcl: 28.8, dispersionUcl: 1.9, dispersionLcl: 0, excluded: true, exclusionReason: 'Press read high, "recalibrated", then retested', outOfSpec: true, rules: [] },
  ],
} as unknown as CharacteristicChart;

describe('points CSV', () => {
  // Read back with papaparse, a general-purpose RFC 4180 parser, not with our own code.
  const text = pointsCsv(chart, 'Europe/London');
  const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });

  it('is RFC 4180 that a CSV reader takes back unchanged, one row per point', () => {
    expect(parsed.errors).toEqual([]);
    expect(parsed.data).toHaveLength(2);
    // UTF-8 with a byte-order mark, so a spreadsheet reads the accents of names right.
    expect(text.startsWith('\uFEFF')).toBe(true);
    expect(text.slice(1).split('\r\n')[0]).toBe(
      'lot,produced_at,shift,n,value_1,value_2,value_3,mean,range,lcl,ucl,range_ucl,out_of_spec,excluded,exclusion_reason,rules',
    );
  });

  it('keeps every replicate, the flags and a reason with commas and quotes', () => {
    const [first, second] = parsed.data;
    expect(first).toMatchObject({ lot: 'L1-1', value_1: '30.1', value_2: '30.5', value_3: '29.8', rules: 'we1 we2', excluded: 'false' });
    expect(second).toMatchObject({ lot: 'L1-2', shift: '', value_3: '', out_of_spec: 'true', excluded: 'true', exclusion_reason: 'Press read high, "recalibrated", then retested' });
  });

  it('neutralises a reason a spreadsheet would run as a formula (OWASP CSV Injection)', () => {
    const risky = { ...chart, points: [{ ...chart.points[1], exclusionReason: '=HYPERLINK("http://x.example","retest")' }] } as CharacteristicChart;
    const [row] = Papa.parse<Record<string, string>>(pointsCsv(risky, 'Europe/London'), { header: true, skipEmptyLines: true }).data;
    expect(row.exclusion_reason).toBe(`'=HYPERLINK("http://x.example","retest")`);
  });

  it('writes figures to the characteristic decimals without floating-point noise, and times as plant time with the offset', () => {
    const [first, second] = parsed.data;
    // One decimal for the results; a mean of three and a range carry one more (the chart shows them so).
    expect(first).toMatchObject({ mean: '30.13', range: '0.70', ucl: '31.85', lcl: '29.00', value_1: '30.1' });
    expect(second).toMatchObject({ value_1: '24.0', value_2: '25.5', mean: '24.75', range: '1.50' });
    expect(text).not.toMatch(/\d\.\d{6,}/);
    // 05:00 UTC on 1 July is 06:00 in London under summer time (BST, UTC+1), ISO 8601 with its offset.
    expect(first.produced_at).toBe('2026-07-01T06:00:00+01:00');
    expect(new Date(first.produced_at).toISOString()).toBe('2026-07-01T05:00:00.000Z');
  });
});
