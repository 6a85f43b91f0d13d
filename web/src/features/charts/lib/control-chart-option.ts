// Builds the echarts option of the control chart: the location chart above the dispersion chart on
// one zoomable axis of point positions (production order), with limits, zones, specification,
// target, rule signals and process events. Pure: the same data always gives the same option.
import type { ComposeOption } from 'echarts/core';
import type { LineSeriesOption, ScatterSeriesOption } from 'echarts/charts';
import type {
  DataZoomComponentOption,
  GridComponentOption,
  MarkAreaComponentOption,
  MarkLineComponentOption,
  TooltipComponentOption,
  AxisPointerComponentOption,
} from 'echarts/components';
import type { CharacteristicChart, ChartPointRecord, ChartViolation } from '@shared/schemas/charts';
import { lineStyles, markers, zoneFill, type LineKind, type MarkerKind } from './line-styles';
import { ruleLabels, statisticNames } from '@shared/spc';
import { formatPlantDate, formatPlantDateTime, type PlantClock } from '@shared/time';
import { formatFigure } from '@shared/figures';
import { escapeHtml, shiftName } from '@web/lib/chart-format';

export type ControlChartOption = ComposeOption<
  | LineSeriesOption
  | ScatterSeriesOption
  | GridComponentOption
  | TooltipComponentOption
  | AxisPointerComponentOption
  | DataZoomComponentOption
  | MarkLineComponentOption
  | MarkAreaComponentOption
>;

/** Above this many points the line is drawn without symbols and thinned by LTTB for the pixels shown. */
export const DENSE_POINTS = 1500;

/** Markers of one kind above which they are drawn as one shape, without rims. */
const LARGE_MARKERS = 400;

/** Series ids the page updates on their own (selection) without rebuilding the option. */
export const SELECTED_SERIES_ID = 'selected-point';

export interface ChartIndex {
  /** Point by its index (the x value). */
  byIndex: Map<number, ChartPointRecord>;
  /** Violations completing at each point, per chart. */
  violationsAt: Map<number, ChartViolation[]>;
  first: number;
  last: number;
}

export function indexChart(chart: CharacteristicChart): ChartIndex {
  const byIndex = new Map<number, ChartPointRecord>();
  for (const p of chart.points) byIndex.set(p.index, p);
  const violationsAt = new Map<number, ChartViolation[]>();
  for (const v of chart.violations) {
    const list = violationsAt.get(v.index);
    if (list) list.push(v);
    else violationsAt.set(v.index, [v]);
  }
  const first = chart.points.length ? chart.points[0].index : 0;
  const last = chart.points.length ? chart.points[chart.points.length - 1].index : 0;
  return { byIndex, violationsAt, first, last };
}

/** The point nearest to an x value, for clicks and keys between or beyond points. */
export function nearestPoint(chart: CharacteristicChart, x: number): ChartPointRecord | null {
  const pts = chart.points;
  if (pts.length === 0) return null;
  let lo = 0;
  let hi = pts.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (pts[mid].index < x) lo = mid + 1;
    else hi = mid;
  }
  if (lo > 0 && Math.abs(pts[lo - 1].index - x) <= Math.abs(pts[lo].index - x)) return pts[lo - 1];
  return pts[lo];
}

const lineStyle = (kind: LineKind) => ({
  color: lineStyles[kind].color,
  width: lineStyles[kind].width,
  type: lineStyles[kind].dash.length ? lineStyles[kind].dash : ('solid' as const),
});

const markerSeries = (kind: MarkerKind, name: string, xAxisIndex: number, data: [number, number][], id: string): ScatterSeriesOption => ({
  id,
  name,
  type: 'scatter',
  xAxisIndex,
  yAxisIndex: xAxisIndex,
  symbol: markers[kind].symbol,
  symbolSize: markers[kind].size,
  itemStyle: kind === 'excluded' || kind === 'selected'
    ? { color: markers[kind].color, borderColor: markers[kind].color, borderWidth: kind === 'selected' ? 3 : 2 }
    : // A white rim sets neighbouring markers apart; past a few hundred, stroking it costs more than it shows.
      { color: markers[kind].color, borderColor: '#ffffff', borderWidth: data.length > LARGE_MARKERS ? 0 : 1 },
  z: kind === 'selected' ? 6 : 5,
  silent: true,
  animation: false,
  // Many markers drawn as one shape: a chart of thousands of signals stays quick to zoom.
  large: true,
  largeThreshold: LARGE_MARKERS,
  data,
});

interface HorizontalLine {
  kind: LineKind;
  value: number | null | undefined;
  label: string;
  /** Labelled at the start inside the plot, without its figure: the zone lines, whose figures the limits summary gives. */
  atStart?: boolean;
  /** Decimals of its figure when not those of the plotted statistic: a specification limit has the characteristic's own. */
  digits?: number;
}

const drawn = (l: HorizontalLine): l is HorizontalLine & { value: number } => typeof l.value === 'number' && Number.isFinite(l.value);

/** Horizontal lines across a plot; only the zone lines carry their label here, the others get theirs at the edge. */
function horizontalMarks(lines: HorizontalLine[]): MarkLineComponentOption {
  return {
    silent: true,
    symbol: 'none',
    animation: false,
    data: lines.filter(drawn).map((l) => ({
      yAxis: l.value,
      lineStyle: lineStyle(l.kind),
      label: l.atStart
        ? { show: true, position: 'insideStartTop' as const, formatter: l.label, color: lineStyles[l.kind].color, fontFamily: 'Roboto Mono', fontSize: 12 }
        : { show: false },
    })),
  };
}

/**
 * Zone letters at the left of the plot, right of the ±σ labels, so that nothing is written over the
 * newest points at the right end.
 */
const zoneLabel = (letter: 'A' | 'B') => ({ show: true, position: 'insideLeft' as const, distance: 40, formatter: letter, color: '#71717a' });
const ZONE_LABEL_A = zoneLabel('A');
const ZONE_LABEL_B = zoneLabel('B');

/** Space right of the plots for the line labels ("Target 1,501.5"). */
const EDGE_MARGIN = 124;

/**
 * Each edge label placed beside its point, then moved down where it would overlap the one above.
 * echarts moves only labels it places itself (x and y given), not those placed by label.position.
 */
export const edgeLabelLayout = (params: { rect: { x: number; y: number; width: number; height: number } }) => ({
  x: params.rect.x + params.rect.width + 6,
  y: params.rect.y + params.rect.height / 2,
  align: 'left' as const,
  verticalAlign: 'middle' as const,
  moveOverlap: 'shiftY' as const,
});

/**
 * The labels of the lines at the right edge of a plot, outside the points, as one series on a hidden
 * axis of its own (0 to 1, untouched by the zoom) so they stay at the edge whatever part is in view;
 * echarts moves labels that would overlap apart vertically (labelLayout moveOverlap).
 */
function edgeLabels(id: string, grid: 0 | 1, lines: HorizontalLine[], decimals: number): ScatterSeriesOption {
  return {
    id,
    type: 'scatter',
    xAxisIndex: grid + 2,
    yAxisIndex: grid,
    symbolSize: 0,
    silent: true,
    animation: false,
    tooltip: { show: false },
    z: 8,
    label: { show: true, position: 'right', distance: 6, fontFamily: 'Roboto Mono', fontSize: 12 },
    labelLayout: edgeLabelLayout,
    data: lines.filter(drawn).map((l) => ({
      value: [1, l.value],
      label: { formatter: `${l.label} ${formatFigure(l.value, l.digits ?? decimals)}`, color: lineStyles[l.kind].color },
    })),
  };
}

/**
 * The labels at the right edge: the specification and the limits of the last point in view (the
 * newest until the chart is zoomed), so that where limits were revised the labels name the lines
 * that end at the edge. The chart updates them after each zoom.
 */
export function edgeLabelSeries(chart: CharacteristicChart, lastInView: number): ScatterSeriesOption[] {
  const { decimals, chartType, subgroupSize } = chart.characteristic;
  const names = statisticNames[chartType];
  const locDecimals = decimals + (subgroupSize > 1 ? 1 : 0);
  const { spec, limits } = chart;
  const end = nearestPoint(chart, lastInView);
  return [
    edgeLabels(
      'location-labels',
      0,
      [
        { kind: 'centre', value: end?.center ?? limits.location.center, label: 'CL' },
        { kind: 'control', value: end?.ucl ?? limits.location.ucl, label: 'UCL' },
        { kind: 'control', value: end?.lcl ?? limits.location.lcl, label: 'LCL' },
        { kind: 'spec', value: spec?.usl, label: 'USL', digits: decimals },
        { kind: 'spec', value: spec?.lsl, label: 'LSL', digits: decimals },
        { kind: 'target', value: spec?.target, label: 'Target', digits: decimals },
      ],
      locDecimals,
    ),
    edgeLabels(
      'dispersion-labels',
      1,
      [
        { kind: 'centre', value: limits.dispersion.center, label: `${names.dispersion}̄` },
        { kind: 'control', value: end?.dispersionUcl ?? limits.dispersion.ucl, label: 'UCL' },
        { kind: 'control', value: end?.dispersionLcl ?? limits.dispersion.lcl, label: 'LCL' },
      ],
      decimals + 1,
    ),
  ];
}

/** Padded value range covering the points, their limits and the specification. */
function valueRange(values: (number | null | undefined)[]): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  for (const v of values) {
    if (typeof v === 'number' && Number.isFinite(v)) {
      if (v < min) min = v;
      if (v > max) max = v;
    }
  }
  if (!Number.isFinite(min)) return { min: 0, max: 1 };
  const pad = (max - min || Math.abs(max) || 1) * 0.06;
  return { min: min - pad, max: max + pad };
}

function extent(points: ChartPointRecord[], pick: (p: ChartPointRecord) => number | null): (number | null)[] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const p of points) {
    const v = pick(p);
    if (v !== null && Number.isFinite(v)) {
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  return Number.isFinite(lo) ? [lo, hi] : [];
}

/** Where each process event falls: just before the first point produced at or after it. */
export function eventPositions(chart: CharacteristicChart): { x: number; title: string; description: string | null; occurredAt: string }[] {
  const pts = chart.points;
  if (pts.length === 0) return [];
  const times = pts.map((p) => Date.parse(p.producedAt));
  const out: { x: number; title: string; description: string | null; occurredAt: string }[] = [];
  for (const e of chart.events) {
    const t = Date.parse(e.occurredAt);
    if (t < times[0] || t > times[times.length - 1]) continue;
    let lo = 0;
    let hi = times.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (times[mid] < t) lo = mid + 1;
      else hi = mid;
    }
    out.push({ x: pts[lo].index - 0.5, title: e.title, description: e.description, occurredAt: e.occurredAt });
  }
  return out;
}

/** The tooltip of one point: lot, time, shift, every replicate, the statistics and the rules in words. */
export function pointTooltipHtml(chart: CharacteristicChart, point: ChartPointRecord, violations: ChartViolation[], clock: PlantClock): string {
  const { unit, decimals, chartType } = chart.characteristic;
  const names = statisticNames[chartType];
  const esc = escapeHtml;
  const rows: string[] = [
    `<div class="font-semibold">Lot ${esc(point.lotNumber)}</div>`,
    `<div>Produced ${esc(formatPlantDateTime(point.producedAt, clock))} · ${esc(shiftName(point.shift))}</div>`,
    `<div>${point.n === 1 ? 'Result' : `Replicates (${point.n})`}: <span class="font-mono">${point.values.map((v) => esc(formatFigure(v, decimals))).join(' · ')}</span> ${esc(unit)}</div>`,
    `<div>${names.location} <span class="font-mono">${esc(formatFigure(point.location, decimals + (point.n > 1 ? 1 : 0)))}</span> ${esc(unit)}` +
      (point.dispersion !== null ? ` · ${names.dispersion} <span class="font-mono">${esc(formatFigure(point.dispersion, decimals + 1))}</span> ${esc(unit)}` : '') +
      '</div>',
  ];
  if (point.outOfSpec) rows.push('<div class="font-medium">◆ Outside the specification</div>');
  if (point.excluded) rows.push(`<div class="font-medium">▢ Excluded from the limits: ${esc(point.exclusionReason ?? 'no reason recorded')}</div>`);
  for (const v of violations) {
    const where = v.chart === 'location' ? `${names.location} chart` : `${names.dispersion} chart`;
    rows.push(`<div class="mt-1 text-red-900">▲ ${esc(ruleLabels[v.rule] ?? v.rule)} (${where}): ${esc(v.description)}</div>`);
  }
  return `<div data-testid="point-tooltip" class="space-y-0.5">${rows.join('')}</div>`;
}

/**
 * Where the tooltip goes: left of the pointer, so that it never hides the newest points on the right,
 * unless there is no room; vertically beside the pointer, inside the chart.
 */
export function tooltipBeside(pointer: number[], _params: unknown, _dom: unknown, _rect: unknown, size: { contentSize: number[]; viewSize: number[] }): number[] {
  const [x, y] = pointer;
  const [width, height] = size.contentSize;
  const [viewWidth, viewHeight] = size.viewSize;
  const gap = 20;
  const left = x - gap - width >= 0 ? x - gap - width : Math.min(x + gap, Math.max(0, viewWidth - width));
  const top = Math.max(0, Math.min(y - height / 2, viewHeight - height));
  return [left, top];
}

type Mark = [number, number];

/** Every marked point of the chart, by marker series id, with the value range of its grid. */
export interface MarkerSets {
  series: { id: MarkerSeriesId; grid: 0 | 1; data: Mark[] }[];
  ranges: [{ min: number; max: number }, { min: number; max: number }];
}

export type MarkerSeriesId = 'signals' | 'signals-dispersion' | 'out-of-spec' | 'excluded' | 'excluded-dispersion';

export function valueRanges(chart: CharacteristicChart) {
  const { points, limits, spec } = chart;
  const topRange = valueRange([
    ...extent(points, (p) => p.location),
    ...extent(points, (p) => p.ucl),
    ...extent(points, (p) => p.lcl),
    limits?.location.ucl,
    limits?.location.lcl,
    spec?.lsl,
    spec?.usl,
    spec?.target,
  ]);
  // Ranges and standard deviations start at zero.
  const bottomRange = { ...valueRange([0, ...extent(points, (p) => p.dispersion), ...extent(points, (p) => p.dispersionUcl), limits?.dispersion.ucl]), min: 0 };
  return { topRange, bottomRange };
}

/** The points to mark, from the full lists (rules, specification, exclusions), never from the thinned line. */
export function markerSets(chart: CharacteristicChart, index: ChartIndex): MarkerSets {
  const signals: Mark[] = [];
  const signalsDispersion: Mark[] = [];
  for (const [at, list] of index.violationsAt) {
    const p = index.byIndex.get(at);
    if (!p) continue;
    if (list.some((v) => v.chart === 'location')) signals.push([at, p.location]);
    if (list.some((v) => v.chart === 'dispersion') && p.dispersion !== null) signalsDispersion.push([at, p.dispersion]);
  }
  signals.sort((a, b) => a[0] - b[0]);
  signalsDispersion.sort((a, b) => a[0] - b[0]);
  const outOfSpec: Mark[] = [];
  const excluded: Mark[] = [];
  const excludedDispersion: Mark[] = [];
  for (const p of chart.points) {
    if (p.outOfSpec) outOfSpec.push([p.index, p.location]);
    if (p.excluded) {
      excluded.push([p.index, p.location]);
      if (p.dispersion !== null) excludedDispersion.push([p.index, p.dispersion]);
    }
  }
  const { topRange, bottomRange } = valueRanges(chart);
  return {
    series: [
      { id: 'signals', grid: 0, data: signals },
      { id: 'signals-dispersion', grid: 1, data: signalsDispersion },
      { id: 'out-of-spec', grid: 0, data: outOfSpec },
      { id: 'excluded', grid: 0, data: excluded },
      { id: 'excluded-dispersion', grid: 1, data: excludedDispersion },
    ],
    ranges: [topRange, bottomRange],
  };
}

/** Cells of the plot a marker stands for when markers are many: about 2 px wide and 1.5 px high on a chart of normal size. */
export const MARKER_CELLS = { across: 600, up: 200 } as const;

/**
 * Markers for the part of the axis in view, at most one per cell of the plot. A marker is 12 px, so a
 * marker left out lies within one cell of one that is drawn: every marked point stays marked where it
 * is, while the canvas draws hundreds of shapes instead of thousands. Zoomed in far enough, every
 * marker is its own cell and all are drawn.
 */
export function thinMarkers(sets: MarkerSets, first: number, last: number): { id: MarkerSeriesId; data: Mark[] }[] {
  const across = Math.max(1, (last - first + 1) / MARKER_CELLS.across);
  return sets.series.map(({ id, grid, data }) => {
    if (data.length <= LARGE_MARKERS) return { id, data };
    const { min, max } = sets.ranges[grid];
    const up = (max - min) / MARKER_CELLS.up || 1;
    const taken = new Set<number>();
    const kept: Mark[] = [];
    for (const m of data) {
      const column = Math.floor((m[0] - first) / across);
      const row = Math.min(MARKER_CELLS.up + 1, Math.max(-1, Math.floor((m[1] - min) / up)));
      const cell = column * (MARKER_CELLS.up + 3) + row + 1;
      if (taken.has(cell)) continue;
      taken.add(cell);
      kept.push(m);
    }
    return { id, data: kept };
  });
}

export function buildControlChartOption(chart: CharacteristicChart, clock: PlantClock, index: ChartIndex = indexChart(chart)): ControlChartOption {
  const { points, limits, spec } = chart;
  const { decimals, chartType } = chart.characteristic;
  const names = statisticNames[chartType];
  const dense = points.length > DENSE_POINTS;
  const locDecimals = decimals + (chart.characteristic.subgroupSize > 1 ? 1 : 0);
  const dispDecimals = decimals + 1;

  const location: [number, number][] = new Array(points.length);
  const cl: [number, number | null][] = new Array(points.length);
  const ucl: [number, number | null][] = new Array(points.length);
  const lcl: [number, number | null][] = new Array(points.length);
  const dispersion: [number, number | null][] = new Array(points.length);
  const dUcl: [number, number | null][] = new Array(points.length);
  const dLcl: [number, number | null][] = new Array(points.length);
  for (let i = 0; i < points.length; i++) {
    const p = points[i];
    location[i] = [p.index, p.location];
    cl[i] = [p.index, p.center];
    ucl[i] = [p.index, p.ucl];
    lcl[i] = [p.index, p.lcl];
    dispersion[i] = [p.index, p.dispersion];
    dUcl[i] = [p.index, p.dispersionUcl];
    dLcl[i] = [p.index, p.dispersionLcl];
  }
  const center = limits?.location.center ?? null;
  const zones = limits?.zones ?? null;
  // With one subgroup size throughout, every point has the headline limits: two marked lines then
  // stand for them instead of four series as long as the data.
  const same = (a: number | null, b: number | null | undefined) => a === b || (a !== null && b != null && Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(b)));
  const constantLimits = points.every(
    (p) => same(p.ucl, limits?.location.ucl) && same(p.lcl, limits?.location.lcl) && same(p.dispersionUcl, limits?.dispersion.ucl) && same(p.dispersionLcl, limits?.dispersion.lcl),
  );
  // After a limit revision the points before it keep the centre line of their time: the centre is
  // then a stepped line, and the zones are shaded only where the limits in force apply.
  let currentFrom = points.length;
  while (currentFrom > 0 && same(points[currentFrom - 1].center, center)) currentFrom--;
  const centreVaries = currentFrom > 0;
  const zoneStart = centreVaries ? { xAxis: points[currentFrom].index - 0.5 } : {};
  const { topRange, bottomRange } = valueRanges(chart);
  const sets = markerSets(chart, index);
  const marked = new Map(thinMarkers(sets, index.first, index.last).map((m) => [m.id, m.data]));

  const zoneAreas: MarkAreaComponentOption = {
    silent: true,
    animation: false,
    data: zones && limits?.location.ucl != null && limits.location.lcl != null
      ? [
          [{ ...zoneStart, yAxis: zones.plus2, itemStyle: { color: zoneFill.A }, label: ZONE_LABEL_A }, { yAxis: limits.location.ucl }],
          [{ ...zoneStart, yAxis: zones.plus1, itemStyle: { color: zoneFill.B }, label: ZONE_LABEL_B }, { yAxis: zones.plus2 }],
          [{ ...zoneStart, yAxis: zones.minus2, itemStyle: { color: zoneFill.B }, label: ZONE_LABEL_B }, { yAxis: zones.minus1 }],
          [{ ...zoneStart, yAxis: limits.location.lcl, itemStyle: { color: zoneFill.A }, label: ZONE_LABEL_A }, { yAxis: zones.minus2 }],
        ]
      : [],
  };

  const events = eventPositions(chart);
  const topMarks = horizontalMarks(
    [
      ...(centreVaries ? [] : ([{ kind: 'centre', value: center, label: 'CL' }] satisfies HorizontalLine[])),
      ...(constantLimits
        ? ([
            { kind: 'control', value: limits?.location.ucl, label: 'UCL' },
            { kind: 'control', value: limits?.location.lcl, label: 'LCL' },
          ] satisfies HorizontalLine[])
        : []),
      ...(centreVaries
        ? []
        : ([
            { kind: 'zone', value: zones?.plus1, label: '+1σ', atStart: true },
            { kind: 'zone', value: zones?.plus2, label: '+2σ', atStart: true },
            { kind: 'zone', value: zones?.minus1, label: '−1σ', atStart: true },
            { kind: 'zone', value: zones?.minus2, label: '−2σ', atStart: true },
          ] satisfies HorizontalLine[])),
      { kind: 'spec', value: spec?.usl, label: 'USL' },
      { kind: 'spec', value: spec?.lsl, label: 'LSL' },
      { kind: 'target', value: spec?.target, label: 'Target' },
    ],
  );
  const limitLine = (name: string, data: [number, number | null][], axis: number, kind: 'control' | 'centre' = 'control'): LineSeriesOption => ({
    name,
    type: 'line',
    xAxisIndex: axis,
    yAxisIndex: axis,
    data,
    step: 'middle',
    showSymbol: false,
    silent: true,
    animation: false,
    sampling: dense ? 'lttb' : undefined,
    lineStyle: lineStyle(kind),
    tooltip: { show: false },
  });

  const xAxis = (gridIndex: number, showLabels: boolean) => ({
    type: 'value' as const,
    gridIndex,
    min: index.first - 0.5,
    max: index.last + 0.5,
    minInterval: 1,
    axisLabel: {
      show: showLabels,
      fontFamily: 'Roboto Mono',
      fontSize: 12,
      color: '#52525b',
      formatter: (value: number) => {
        const p = index.byIndex.get(Math.round(value));
        return p && Number.isInteger(value) ? formatPlantDate(p.producedAt, clock) : '';
      },
    },
    axisTick: { show: showLabels },
    splitLine: { show: false },
    axisPointer: { label: { show: false } },
  });

  // The edge labels' own axes: 0 is the left end of the plot, 1 the right, whatever the zoom.
  const edgeAxis = (gridIndex: number) => ({ type: 'value' as const, gridIndex, min: 0, max: 1, show: false, axisPointer: { show: false, triggerTooltip: false } });

  const yAxis = (gridIndex: number, range: { min: number; max: number }, name: string, digits: number) => ({
    type: 'value' as const,
    gridIndex,
    min: range.min,
    max: range.max,
    scale: true,
    name,
    nameLocation: 'middle' as const,
    nameGap: 56,
    nameTextStyle: { color: '#3f3f46', fontSize: 13 },
    // The padded ends are not round numbers; only the ticks between them are labelled.
    axisLabel: { fontFamily: 'Roboto Mono', fontSize: 12, color: '#52525b', showMinLabel: false, showMaxLabel: false, formatter: (v: number) => v.toFixed(Math.max(0, digits - 1)) },
    splitLine: { lineStyle: { color: '#f4f4f5' } },
  });

  // The location and the dispersion series draw their points alike.
  const pointSeries = {
    showSymbol: !dense,
    symbol: markers.point.symbol,
    symbolSize: markers.point.size,
    sampling: dense ? ('lttb' as const) : undefined,
    lineStyle: { color: markers.point.color, width: 1.25 },
    itemStyle: { color: markers.point.color },
    emphasis: { disabled: true },
    z: 3,
  };

  return {
    animation: !dense,
    textStyle: { fontFamily: 'Inter, sans-serif' },
    grid: [
      { left: 72, right: EDGE_MARGIN, top: 28, height: '52%' },
      { left: 72, right: EDGE_MARGIN, top: '66%', height: '20%' },
    ],
    axisPointer: { link: [{ xAxisIndex: [0, 1] }] },
    tooltip: {
      trigger: 'axis',
      confine: true,
      position: tooltipBeside,
      axisPointer: { type: 'line', lineStyle: { color: '#a1a1aa' } },
      backgroundColor: '#ffffff',
      borderColor: '#d4d4d8',
      textStyle: { color: '#18181b', fontSize: 13 },
      extraCssText: 'max-width: 28rem; white-space: normal;',
      formatter: (params: unknown) => {
        const list = (Array.isArray(params) ? params : [params]) as { axisValue?: number; axisIndex?: number }[];
        const x = list.find((q) => q.axisIndex === 0 || q.axisIndex === 1)?.axisValue;
        if (typeof x !== 'number') return '';
        const p = nearestPoint(chart, x);
        return p ? pointTooltipHtml(chart, p, index.violationsAt.get(p.index) ?? [], clock) : '';
      },
    },
    dataZoom: [
      { type: 'inside', xAxisIndex: [0, 1], filterMode: 'filter', throttle: 50 },
      {
        type: 'slider',
        xAxisIndex: [0, 1],
        filterMode: 'filter',
        bottom: 10,
        height: 26,
        throttle: 50,
        showDataShadow: false,
        labelFormatter: (value: number) => {
          const p = nearestPoint(chart, value);
          return p ? formatPlantDate(p.producedAt, clock) : '';
        },
        textStyle: { fontFamily: 'Roboto Mono', fontSize: 12 },
      },
    ],
    xAxis: [xAxis(0, false), xAxis(1, true), edgeAxis(0), edgeAxis(1)],
    yAxis: [yAxis(0, topRange, `${names.location} (${chart.characteristic.unit})`, locDecimals), yAxis(1, bottomRange, names.dispersion, dispDecimals)],
    series: [
      {
        id: 'location',
        name: names.location,
        type: 'line',
        xAxisIndex: 0,
        yAxisIndex: 0,
        data: location,
        ...pointSeries,
        markLine: topMarks,
        markArea: zoneAreas,
      },
      ...(centreVaries ? [limitLine('CL', cl, 0, 'centre')] : []),
      ...(constantLimits ? [] : [limitLine('UCL', ucl, 0), limitLine('LCL', lcl, 0)]),
      {
        id: 'dispersion',
        name: names.dispersion,
        type: 'line',
        xAxisIndex: 1,
        yAxisIndex: 1,
        data: dispersion,
        connectNulls: false,
        ...pointSeries,
        markLine: horizontalMarks([
          { kind: 'centre', value: limits?.dispersion.center, label: `${names.dispersion}̄` },
          ...(constantLimits
            ? ([
                { kind: 'control', value: limits?.dispersion.ucl, label: 'UCL' },
                { kind: 'control', value: limits?.dispersion.lcl, label: 'LCL' },
              ] satisfies HorizontalLine[])
            : []),
        ]),
      },
      ...(constantLimits ? [] : [limitLine(`${names.dispersion} UCL`, dUcl, 1), limitLine(`${names.dispersion} LCL`, dLcl, 1)]),
      ...edgeLabelSeries(chart, index.last),
      markerSeries('outOfSpec', 'Outside specification', 0, marked.get('out-of-spec')!, 'out-of-spec'),
      markerSeries('excluded', 'Excluded', 0, marked.get('excluded')!, 'excluded'),
      markerSeries('excluded', `${names.dispersion} of an excluded point`, 1, marked.get('excluded-dispersion')!, 'excluded-dispersion'),
      markerSeries('signal', 'Rule signal', 0, marked.get('signals')!, 'signals'),
      markerSeries('signal', `${names.dispersion} rule signal`, 1, marked.get('signals-dispersion')!, 'signals-dispersion'),
      markerSeries('selected', 'Selected point', 0, [], SELECTED_SERIES_ID),
      // Process events on a series of their own, above the points, so no point hides an event's name.
      {
        name: 'Process events',
        type: 'line',
        xAxisIndex: 0,
        yAxisIndex: 0,
        data: [],
        silent: true,
        z: 7,
        markLine: {
          silent: true,
          symbol: 'none',
          animation: false,
          data: events.map((e) => ({
            xAxis: e.x,
            lineStyle: lineStyle('event'),
            label: {
              show: true,
              position: 'insideEndTop' as const,
              formatter: e.title,
              color: '#3f3f46',
              fontSize: 12,
              backgroundColor: 'rgba(255, 255, 255, 0.85)',
              padding: [1, 3],
            },
          })),
        },
      },
    ],
  };
}
