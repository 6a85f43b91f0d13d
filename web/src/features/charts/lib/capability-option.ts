// The capability histogram: counts of the kept values, the normal curve fitted with their mean and
// overall standard deviation, and the specification limits and target as labelled vertical lines.
import type { ComposeOption } from 'echarts/core';
import { formatFigure } from '@shared/figures';
import type { BarSeriesOption, LineSeriesOption } from 'echarts/charts';
import type { GridComponentOption, MarkLineComponentOption, TooltipComponentOption } from 'echarts/components';
import type { CapabilityResult } from '@shared/spc';
import { lineStyles, type LineKind } from './line-styles';

export type CapabilityOption = ComposeOption<BarSeriesOption | LineSeriesOption | GridComponentOption | MarkLineComponentOption | TooltipComponentOption>;

export interface Histogram {
  /** Left edge of the first bin. */
  start: number;
  width: number;
  counts: number[];
}

/** Equal-width bins over the values: √n of them, between 8 and 30, on edges that are round numbers of the unit. */
export function histogram(values: ArrayLike<number>, decimals: number): Histogram {
  const n = values.length;
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < n; i++) {
    if (values[i] < min) min = values[i];
    if (values[i] > max) max = values[i];
  }
  if (n === 0) return { start: 0, width: 1, counts: [] };
  const resolution = 10 ** -decimals;
  const bins = Math.min(30, Math.max(8, Math.ceil(Math.sqrt(n))));
  // A bin is a whole number of the resolution the lab reports in, so no bin catches more readings by rounding.
  const width = Math.max(resolution, Math.ceil((max - min + resolution) / bins / resolution) * resolution);
  const start = min - resolution / 2;
  const count = Math.max(1, Math.ceil((max - start) / width + 1e-9));
  const counts = new Array<number>(count).fill(0);
  for (let i = 0; i < n; i++) counts[Math.min(count - 1, Math.floor((values[i] - start) / width))]++;
  return { start, width, counts };
}

const normalDensity = (z: number) => Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);

function verticalLine(kind: LineKind, value: number | null, label: string, decimals: number) {
  if (value === null || !Number.isFinite(value)) return [];
  const s = lineStyles[kind];
  return [
    {
      xAxis: value,
      lineStyle: { color: s.color, width: s.width, type: s.dash.length ? s.dash : ('solid' as const) },
      label: { show: true, position: 'end' as const, formatter: `${label} ${formatFigure(value, decimals)}`, color: s.color, fontFamily: 'Roboto Mono', fontSize: 12 },
    },
  ];
}

export function buildCapabilityOption(values: ArrayLike<number>, capability: CapabilityResult, unit: string, decimals: number): CapabilityOption {
  const h = histogram(values, decimals);
  const n = values.length;
  const bars: [number, number][] = h.counts.map((c, i) => [h.start + (i + 0.5) * h.width, c]);
  const lo = Math.min(h.start, capability.lsl ?? Infinity);
  const hi = Math.max(h.start + h.counts.length * h.width, capability.usl ?? -Infinity);
  const pad = (hi - lo) * 0.05;
  const axisMin = lo - pad;
  const axisMax = hi + pad;

  const curve: [number, number][] = [];
  const { mean, sigmaOverall } = capability;
  if (mean !== null && sigmaOverall !== null && sigmaOverall > 0) {
    const steps = 120;
    for (let i = 0; i <= steps; i++) {
      const x = axisMin + ((axisMax - axisMin) * i) / steps;
      curve.push([x, (n * h.width * normalDensity((x - mean) / sigmaOverall)) / sigmaOverall]);
    }
  }

  return {
    animation: false,
    textStyle: { fontFamily: 'Inter, sans-serif' },
    grid: { left: 48, right: 24, top: 36, bottom: 40 },
    tooltip: {
      trigger: 'axis',
      confine: true,
      formatter: (params: unknown) => {
        const bar = (Array.isArray(params) ? params : [params]).find((p) => (p as { seriesType?: string }).seriesType === 'bar') as { value?: [number, number] } | undefined;
        if (!bar?.value) return '';
        const [centre, count] = bar.value;
        const from = centre - h.width / 2;
        return `${formatFigure(from, decimals + 1)} to ${formatFigure(from + h.width, decimals + 1)} ${unit}: ${count} value${count === 1 ? '' : 's'}`;
      },
    },
    xAxis: {
      type: 'value',
      min: axisMin,
      max: axisMax,
      name: unit,
      nameLocation: 'middle',
      nameGap: 26,
      axisLabel: { fontFamily: 'Roboto Mono', fontSize: 12, color: '#52525b', showMinLabel: false, showMaxLabel: false },
      splitLine: { show: false },
    },
    yAxis: { type: 'value', name: 'Values', nameTextStyle: { color: '#52525b' }, axisLabel: { fontFamily: 'Roboto Mono', fontSize: 12, color: '#52525b' }, splitLine: { lineStyle: { color: '#f4f4f5' } } },
    series: [
      {
        type: 'bar',
        name: 'Values',
        data: bars,
        barWidth: '96%',
        itemStyle: { color: '#a1a1aa', borderColor: '#71717a', borderWidth: 0.5 },
        markLine: {
          silent: true,
          symbol: 'none',
          animation: false,
          data: [
            ...verticalLine('spec', capability.lsl, 'LSL', decimals),
            ...verticalLine('spec', capability.usl, 'USL', decimals),
            ...verticalLine('target', capability.target, 'Target', decimals),
          ],
        } satisfies MarkLineComponentOption,
      },
      {
        type: 'line',
        name: 'Fitted normal curve',
        data: curve,
        showSymbol: false,
        smooth: false,
        silent: true,
        lineStyle: { color: '#27272a', width: 2 },
        tooltip: { show: false },
      },
    ],
  };
}
