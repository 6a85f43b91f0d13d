// The sentence of an alarm: the chart's figure against the same chart's limit, in the characteristic's decimals.
import { describe, expect, it } from 'vitest';
import { alarmSentence, statisticWords } from './alarm-words';

const base = { chart: 'location' as const, chartType: 'xbar-r' as const, values: [1500, 1502], unit: 'kg/m³', decimals: 0, limitName: 'UCL', limitValue: 1490 };

describe('alarm sentences', () => {
  it('say which figure is beyond which limit, grouped thousands and the characteristic’s decimals', () => {
    expect(alarmSentence({ ...base, rule: 'we1', statistic: 1501 })).toBe('Subgroup mean 1,501 kg/m³ above the upper control limit 1,490 kg/m³.');
    expect(alarmSentence({ ...base, rule: 'we1', chart: 'dispersion', statistic: 52, limitValue: 41.9 })).toBe('Subgroup range 52 kg/m³ above the upper control limit 42 kg/m³.');
    expect(alarmSentence({ ...base, rule: 'we1', statistic: 1401, limitName: 'LCL', limitValue: 1410 })).toBe('Subgroup mean 1,401 kg/m³ below the lower control limit 1,410 kg/m³.');
  });

  it('add decimals only where the figure and its limit would otherwise read the same', () => {
    expect(alarmSentence({ ...base, rule: 'we1', unit: 'MPa', decimals: 1, statistic: 13.93, limitValue: 13.88 })).toBe('Subgroup mean 13.93 MPa above the upper control limit 13.88 MPa.');
  });

  it('tell an out-of-specification lot by its result, its results and the specification revision', () => {
    expect(alarmSentence({ ...base, rule: 'out-of-spec', statistic: 1501, values: [1500, 1502], limitName: 'USL', limitValue: 1500, specRevision: 2 })).toBe(
      'Lot result 1,501 kg/m³ (mean of 2 results: 1,500, 1,502) above the upper specification limit 1,500 kg/m³ (specification revision 2).',
    );
  });

  it('name a pattern in words and never by its rule identifier', () => {
    const text = alarmSentence({ ...base, rule: 'we4', statistic: 1495, limitName: null, limitValue: null });
    expect(text).toBe('Eight points in a row lie on the same side of the centre line. The pattern is complete at this lot, subgroup mean 1,495 kg/m³.');
    expect(alarmSentence({ ...base, rule: 'unknown-rule', statistic: 1, limitName: null, limitValue: null })).not.toContain('unknown-rule');
  });

  it('name the plotted figure of each chart type', () => {
    expect(['xbar-r', 'xbar-s', 'imr'].flatMap((t) => (['location', 'dispersion'] as const).map((c) => statisticWords(t as 'imr', c)))).toEqual([
      'subgroup mean', 'subgroup range', 'subgroup mean', 'subgroup standard deviation', 'individual value', 'moving range',
    ]);
  });
});
