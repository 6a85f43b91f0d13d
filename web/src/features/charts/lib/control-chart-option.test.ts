import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { CharacteristicChart, ChartPointRecord, ChartViolation } from '@shared/schemas/charts';
import { ruleDescriptions } from '@shared/spc';
import type { PlantClock } from '@shared/time';
import {
  buildControlChartOption,
  edgeLabelLayout,
  edgeLabelSeries,
  DENSE_POINTS,
  eventPositions,
  indexChart,
  markerSets,
  MARKER_CELLS,
  nearestPoint,
  tooltipBeside,
  pointTooltipHtml,
  thinMarkers,
} from './control-chart-option';
import { lineStyles } from './line-styles';

/** A chart as the endpoint answers it: X̄–R of two flow readings per lot, six hours apart. */
function fixture(count: number, flagged: (i: number) => boolean = () => false): CharacteristicChart {
  const points: ChartPointRecord[] = [];
  const violations: ChartViolation[] = [];
  for (let i = 0; i < count; i++) {
    const a = 145 + ((i * 37) % 9) - 4;
    const b = a + ((i * 11) % 5) - 2;
    points.push({
      index: i,
      lotId: 1000 + i,
      lotNumber: `L1-T-${i}`,
      producedAt: new Date(Date.UTC(2026, 0, 1) + i * 6 * 3_600_000).toISOString(),
      shift: 'early',
      n: 2,
      values: [a, b],
      location: (a + b) / 2,
      dispersion: Math.abs(a - b),
      center: 145,
      ucl: 149,
      lcl: 141,
      dispersionUcl: 7,
      dispersionLcl: 0,
      excluded: false,
      exclusionReason: null,
      outOfSpec: false,
      rules: flagged(i) ? ['we4'] : [],
    });
    if (flagged(i)) violations.push({ rule: 'we4', chart: 'location', index: i, points: [i], description: ruleDescriptions.we4 });
  }
  return {
    window: { period: 'all', from: null, to: null, limitsFrom: null },
    characteristic: { id: 1, code: 'T-FLOW', name: 'Test · flow', unit: 'mm', chartType: 'xbar-r', ruleSet: 'extended', subgroupSize: 2, productCode: 'T', productName: 'Test', lineCode: 'L1', decimals: 0 },
    spec: { lsl: 135, usl: 155, target: 145, revision: 1 },
    limits: {
      source: 'trial',
      revisionId: null,
      baselineFrom: null,
      baselineTo: null,
      frozenAt: null,
      frozenBy: null,
      reason: null,
      location: { center: 145, ucl: 149, lcl: 141, sigma: 4 / 3 },
      dispersion: { center: 2.2, ucl: 7, lcl: 0 },
      zones: { plus1: 146 + 1 / 3, plus2: 147 + 2 / 3, minus1: 143 + 2 / 3, minus2: 142 + 1 / 3 },
      sigmaWithin: 1.9,
      sigmaOverall: 2.4,
    },
    points,
    violations,
    events: [{ id: 1, occurredAt: new Date(Date.UTC(2026, 0, 1) + 10 * 6 * 3_600_000 - 60_000).toISOString(), title: 'New sand source', description: null }],
    capability: null,
    reasons: [],
  };
}

type Series = {
  id?: string;
  name?: string;
  type?: string;
  data?: unknown[];
  sampling?: string;
  showSymbol?: boolean;
  xAxisIndex?: number;
  labelLayout?: unknown;
  markLine?: { data?: { yAxis?: number; xAxis?: number; lineStyle?: { type?: unknown; color?: string }; label?: { show?: boolean; formatter?: unknown; color?: string } }[] };
};
type EdgeLabel = { value: [number, number]; label: { formatter: string; color: string } };

const UTC: PlantClock = { timeZone: 'UTC', dateFormat: 'dd/MM/yyyy' };

/** Every label of a horizontal line, by its text's first word, with the line's value: zone lines label themselves, the others at the edge. */
function lineLabels(series: Series[]): Map<string, { y: number; color?: string }> {
  const out = new Map<string, { y: number; color?: string }>();
  for (const l of series.flatMap((x) => x.markLine?.data ?? [])) {
    if (l.yAxis !== undefined && l.label?.show !== false) out.set(String(l.label?.formatter).split(' ')[0], { y: l.yAxis, color: l.label?.color });
  }
  for (const x of series.filter((y) => y.id === 'location-labels')) for (const d of x.data as EdgeLabel[]) out.set(d.label.formatter.split(' ')[0], { y: d.value[1], color: d.label.color });
  return out;
}

describe('control chart option', () => {
  it('draws every reference line with its own dash pattern and a label, not by colour alone', () => {
    const option = buildControlChartOption(fixture(50), UTC);
    const series = option.series as Series[];
    const lines = series.flatMap((s) => s.markLine?.data ?? []).filter((l) => l.yAxis !== undefined);
    const labels = lineLabels(series);
    expect([...labels.keys()]).toEqual(expect.arrayContaining(['CL', 'UCL', 'LCL', '+1σ', '+2σ', '−1σ', '−2σ', 'USL', 'LSL', 'Target']));
    // Each label stands at the value of a line drawn, in its colour; the dash pattern is that line's.
    const labelled = new Map([...labels].map(([name, { y, color }]) => [name, JSON.stringify(lines.find((l) => l.yAxis === y && l.lineStyle?.color === color)?.lineStyle?.type)]));
    for (const name of labels.keys()) expect(labelled.get(name)).toBeDefined();
    // Centre, control limit, zone, specification and target lines differ in their dash pattern.
    const patterns = ['CL', 'UCL', '+1σ', 'USL', 'Target'].map((k) => labelled.get(k));
    expect(new Set(patterns).size).toBe(5);
    expect(labelled.get('UCL')).toBe(labelled.get('LCL'));
    expect(labelled.get('USL')).toBe(JSON.stringify(lineStyles.spec.dash));
  });

  it('steps the centre and control lines where a limit revision takes over, and shades the zones only from there', () => {
    const chart = fixture(40);
    // Points 0–19 keep the limits of their time (centre 150); the revision in force applies from 20.
    for (const p of chart.points.slice(0, 20)) Object.assign(p, { center: 150, ucl: 154, lcl: 146 });
    const option = buildControlChartOption(chart, UTC);
    const series = option.series as (Series & { markArea?: { data?: { xAxis?: number; yAxis?: number }[][] } })[];
    const centre = series.find((s) => s.name === 'CL')!;
    expect(centre.data).toEqual(chart.points.map((p) => [p.index, p.center]));
    expect(series.find((s) => s.name === 'UCL')!.data).toEqual(chart.points.map((p) => [p.index, p.ucl]));
    const labels = lineLabels(series);
    expect(labels.has('+1σ')).toBe(false);
    // The edge gives the centre line and limits of the newest point, where the stepped lines end.
    expect(labels.get('CL')?.y).toBe(chart.points.at(-1)!.center);
    expect(labels.get('UCL')?.y).toBe(chart.points.at(-1)!.ucl);
    // Zoomed into the stretch before the revision, the edge names the limits of that time.
    const [zoomed] = edgeLabelSeries(chart, 10);
    expect((zoomed.data as EdgeLabel[]).map((d) => d.label.formatter)).toEqual(expect.arrayContaining(['CL 150.0', 'UCL 154.0', 'LCL 146.0']));
    const areas = series.find((s) => s.id === 'location')!.markArea!.data!;
    expect(areas).toHaveLength(4);
    expect(areas.every(([from]) => from.xAxis === 19.5)).toBe(true);
  });

  it('marks every rule-breaking point even when the line itself is thinned for thousands of points', () => {
    const count = DENSE_POINTS * 4;
    const chart = fixture(count, (i) => i % 7 === 0);
    const series = buildControlChartOption(chart, UTC).series as Series[];
    const line = series.find((s) => s.id === 'location')!;
    expect(line.sampling).toBe('lttb');
    expect(line.showSymbol).toBe(false);
    const signals = series.find((s) => s.id === 'signals')!.data as [number, number][];
    // Thinned markers: each flagged point lies within one plot cell of a drawn marker.
    const cellX = count / MARKER_CELLS.across;
    for (const v of chart.violations) {
      const p = chart.points[v.index];
      expect(signals.some(([x, y]) => Math.abs(x - p.index) <= cellX && Math.abs(y - p.location) <= 1)).toBe(true);
    }
  });

  it('places a process event just before the first lot produced after it', () => {
    const chart = fixture(30);
    expect(eventPositions(chart)).toEqual([{ x: 9.5, title: 'New sand source', description: null, occurredAt: chart.events[0].occurredAt }]);
    const series = buildControlChartOption(chart, UTC).series as Series[];
    const events = series.find((s) => s.name === 'Process events')!;
    expect(events.markLine!.data![0]).toMatchObject({ xAxis: 9.5, label: { formatter: 'New sand source' } });
  });

  it('finds the nearest point to a position on the axis', () => {
    const chart = fixture(10);
    expect(nearestPoint(chart, 3.4)?.index).toBe(3);
    expect(nearestPoint(chart, 3.6)?.index).toBe(4);
    expect(nearestPoint(chart, -5)?.index).toBe(0);
    expect(nearestPoint(chart, 99)?.index).toBe(9);
  });

  it('puts lot, time, shift, every replicate and the rule in words into the tooltip, with text escaped', () => {
    const chart = fixture(12, (i) => i === 11);
    const p = { ...chart.points[11], lotNumber: 'L1-<b>&', excluded: true, exclusionReason: 'Ring "lifted"' };
    const html = pointTooltipHtml(chart, p, indexChart(chart).violationsAt.get(11)!, { timeZone: 'Europe/London', dateFormat: 'dd/MM/yyyy' });
    expect(html).toContain('Lot L1-&lt;b&gt;&amp;');
    expect(html).toContain('Early shift');
    expect(html).toContain(`Replicates (2): <span class="font-mono">${p.values.map((v) => v.toFixed(0)).join(' · ')}</span> mm`);
    expect(html).toContain(ruleDescriptions.we4);
    expect(html).toContain('Ring &quot;lifted&quot;');
    expect(html).toContain('03/01/2026 18:00');
    // A point is named by its lot and time, never by its position, which changes with the period shown.
    expect(html).not.toMatch(/Point \d/);
  });

  it('keeps the line labels at the right edge outside the plot, moved apart where they would overlap', () => {
    const chart = fixture(50);
    // Target on the UCL and the USL one unit above: their labels would print over each other.
    chart.spec = { lsl: 135, usl: 150, target: 149, revision: 1 };
    const option = buildControlChartOption(chart, UTC);
    const series = option.series as Series[];
    const edge = series.find((s) => s.id === 'location-labels')!;
    // echarts' label layout moves overlapping labels apart vertically; it does so for labels it places itself.
    expect(edge.labelLayout).toBe(edgeLabelLayout);
    expect(edgeLabelLayout({ rect: { x: 800, y: 100, width: 0, height: 0 } })).toEqual({ x: 806, y: 100, align: 'left', verticalAlign: 'middle', moveOverlap: 'shiftY' });
    const texts = (edge.data as EdgeLabel[]).map((d) => d.label.formatter);
    expect(texts).toEqual(expect.arrayContaining(['USL 150', 'Target 149', 'UCL 149.0']));
    // On an axis of its own that the zoom does not move, at its right end.
    const zooms = option.dataZoom as { xAxisIndex: number[] }[];
    for (const z of zooms) expect(z.xAxisIndex).not.toContain(edge.xAxisIndex);
    expect((edge.data as EdgeLabel[]).every((d) => d.value[0] === 1)).toBe(true);
    expect((option.xAxis as { min?: number; max?: number; show?: boolean }[])[edge.xAxisIndex!]).toMatchObject({ min: 0, max: 1, show: false });
    // No label is drawn inside the plot at its right end, where the newest points are.
    const inside = series.flatMap((s) => s.markLine?.data ?? []).filter((l) => l.label?.show !== false && l.yAxis !== undefined);
    expect(inside.every((l) => /σ$/.test(String(l.label?.formatter)))).toBe(true);
  });

  it('puts the tooltip left of the pointer, off the newest points, and inside the chart', () => {
    const size = { contentSize: [300, 120], viewSize: [1000, 540] };
    expect(tooltipBeside([900, 100], null, null, null, size)).toEqual([580, 40]);
    // Near the left edge there is no room on the left: it goes to the right of the pointer.
    expect(tooltipBeside([100, 500], null, null, null, size)).toEqual([120, 420]);
    expect(buildControlChartOption(fixture(10), UTC).tooltip).toMatchObject({ confine: true, position: tooltipBeside });
  });
});

describe('marker thinning', () => {
  const marks = (xs: [number, number][]) => ({ series: [{ id: 'signals' as const, grid: 0 as const, data: xs }], ranges: [{ min: 130, max: 160 }, { min: 0, max: 10 }] as [{ min: number; max: number }, { min: number; max: number }] });

  it('never leaves a marked place without a marker, and draws all of them once zoomed in', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: 0, max: 9999 }), fc.double({ min: 130, max: 160, noNaN: true })), { minLength: 401, maxLength: 3000 }),
        fc.integer({ min: 0, max: 9000 }),
        fc.integer({ min: 10, max: 1000 }),
        (data, first, span) => {
          const last = first + span;
          const sorted = [...data].sort((a, b) => a[0] - b[0]);
          const [{ data: kept }] = thinMarkers(marks(sorted), first, last);
          const cellX = Math.max(1, (span + 1) / MARKER_CELLS.across);
          const cellY = 30 / MARKER_CELLS.up;
          for (const [x, y] of sorted) {
            if (!kept.some(([kx, ky]) => Math.abs(kx - x) <= cellX && Math.abs(ky - y) <= cellY)) return false;
          }
          // Zoomed in to fewer points than cells across, no two points share a column: none is dropped in view.
          if (span + 1 <= MARKER_CELLS.across) {
            const distinct = new Set(sorted.filter(([x]) => x >= first && x <= last).map(([x, y]) => `${x}|${Math.floor((y - 130) / cellY)}`));
            const keptInView = kept.filter(([x]) => x >= first && x <= last).length;
            if (keptInView !== distinct.size) return false;
          }
          return kept.every((k) => sorted.includes(k));
        },
      ),
      { numRuns: 60 },
    );
  });

  it('leaves a few hundred markers as they are', () => {
    const data: [number, number][] = Array.from({ length: 300 }, (_, i) => [i, 145]);
    expect(thinMarkers(marks(data), 0, 299)[0].data).toBe(data);
  });

  it('collects markers from the violations, outside-specification and excluded points', () => {
    const chart = fixture(20, (i) => i === 3);
    chart.points[5] = { ...chart.points[5], outOfSpec: true };
    chart.points[6] = { ...chart.points[6], excluded: true };
    const byId = new Map(markerSets(chart, indexChart(chart)).series.map((s) => [s.id, s.data.map(([x]) => x)]));
    expect(byId.get('signals')).toEqual([3]);
    expect(byId.get('out-of-spec')).toEqual([5]);
    expect(byId.get('excluded')).toEqual([6]);
    expect(byId.get('excluded-dispersion')).toEqual([6]);
  });
});
