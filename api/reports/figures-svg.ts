// The report's two figures — the control chart of the period and the histogram against the
// specification — drawn on the server by echarts' own SVG renderer, to be placed in the PDF as vector
// graphics. Printed in black and white, lines are told apart by their dash pattern and weight, not by
// colour: values solid, centre line fine, control limits dashed, specification limits dash-dot and heavy.
import * as echarts from 'echarts';
import type { CharacteristicChart } from '@shared/schemas/charts';
import { formatFigure } from '@shared/figures';

/** The dash patterns of the figures, also drawn in the PDF's key so a reader matches them. */
export const lineKinds = {
  values: { dash: null, width: 1, colour: '#000000' },
  centre: { dash: null, width: 0.6, colour: '#555555' },
  control: { dash: [6, 3], width: 1, colour: '#222222' },
  spec: { dash: [10, 3, 2, 3], width: 1.6, colour: '#000000' },
  model: { dash: [2, 2], width: 1, colour: '#333333' },
} as const;

const text = { fontFamily: 'Inter', fontSize: 9, color: '#000000' };

function render(option: echarts.EChartsCoreOption, width: number, height: number): string {
  const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width, height });
  try {
    chart.setOption({ animation: false, textStyle: text, ...option });
    return chart.renderToSVGString();
  } finally {
    chart.dispose();
  }
}

const style = (k: keyof typeof lineKinds) => ({ color: lineKinds[k].colour, width: lineKinds[k].width, type: lineKinds[k].dash ? [...lineKinds[k].dash] : 'solid' });

/** A limit that can change along the chart (a limit revision takes over) as a step line; gaps where there is none. */
const limitLine = (chart: CharacteristicChart, pick: (p: CharacteristicChart['points'][number]) => number | null) =>
  chart.points.map((p) => [p.index + 1, pick(p)]);

/** The control chart of the subgroup means (or individual values) with its limits and the specification. */
export function controlChartSvg(chart: CharacteristicChart, width: number, height: number): string {
  const d = chart.characteristic.decimals;
  const spec = chart.spec;
  const signalled = chart.points.filter((p) => p.rules.length > 0 && !p.excluded);
  const excluded = chart.points.filter((p) => p.excluded);
  const specLines = [
    spec?.usl !== null && spec?.usl !== undefined ? { yAxis: spec.usl, name: 'USL' } : null,
    spec?.lsl !== null && spec?.lsl !== undefined ? { yAxis: spec.lsl, name: 'LSL' } : null,
  ].filter((x) => x !== null);
  const values = chart.points.map((p) => p.location);
  const around = [...values, ...specLines.map((s) => s.yAxis), ...chart.points.flatMap((p) => [p.ucl, p.lcl]).filter((v): v is number => v !== null)];
  const lo = Math.min(...around);
  const hi = Math.max(...around);
  const pad = (hi - lo || Math.abs(hi) || 1) * 0.06;
  return render(
    {
      grid: { left: 58, right: 40, top: 28, bottom: 30 },
      legend: {
        top: 0,
        left: 'center',
        itemWidth: 28,
        itemHeight: 8,
        textStyle: text,
        data: ['Subgroup value', 'Centre line', 'Control limits', 'Signal', 'Excluded'],
      },
      xAxis: { type: 'value', min: 1, max: Math.max(2, chart.points.length), name: 'Subgroup', nameLocation: 'middle', nameGap: 18, axisLabel: text, splitLine: { show: false } },
      yAxis: {
        type: 'value',
        min: Number((lo - pad).toFixed(d + 1)),
        max: Number((hi + pad).toFixed(d + 1)),
        name: chart.characteristic.unit,
        nameLocation: 'middle',
        nameGap: 44,
        axisLabel: { ...text, formatter: (v: number) => formatFigure(v, d) },
        splitLine: { lineStyle: { color: '#dddddd', width: 0.5 } },
      },
      series: [
        {
          name: 'Subgroup value',
          type: 'line',
          data: chart.points.map((p) => [p.index + 1, p.location]),
          // Symbols only where a few points leave room; signals and exclusions have their own marks.
          symbol: chart.points.length <= 60 ? 'circle' : 'none',
          symbolSize: 3,
          lineStyle: style('values'),
          itemStyle: { color: '#000000' },
          markLine: specLines.length
            ? {
                symbol: 'none',
                silent: true,
                lineStyle: style('spec'),
                label: { ...text, formatter: (p: { name: string }) => p.name, position: 'end' },
                data: specLines,
              }
            : undefined,
        },
        { name: 'Centre line', type: 'line', step: 'middle', symbol: 'none', data: limitLine(chart, (p) => p.center), lineStyle: style('centre'), itemStyle: { color: lineKinds.centre.colour } },
        { name: 'Control limits', type: 'line', step: 'middle', symbol: 'none', data: limitLine(chart, (p) => p.ucl), lineStyle: style('control'), itemStyle: { color: lineKinds.control.colour } },
        { name: 'Control limits', type: 'line', step: 'middle', symbol: 'none', data: limitLine(chart, (p) => p.lcl), lineStyle: style('control'), itemStyle: { color: lineKinds.control.colour } },
        // Shapes, not colours, mark a point: a filled square for a signal, an open circle for an excluded point.
        { name: 'Signal', type: 'scatter', symbol: 'rect', symbolSize: 6, data: signalled.map((p) => [p.index + 1, p.location]), itemStyle: { color: '#000000' } },
        { name: 'Excluded', type: 'scatter', symbol: 'emptyCircle', symbolSize: 7, data: excluded.map((p) => [p.index + 1, p.location]), itemStyle: { color: '#000000', borderWidth: 1 } },
      ],
    },
    width,
    height,
  );
}

/** Sturges' number of bins (common practice for a report histogram), at least 5 and at most 30. */
const binCount = (n: number) => Math.max(5, Math.min(30, Math.ceil(Math.log2(Math.max(n, 1)) + 1)));

/** The histogram of the kept values with the specification limits and the normal model of mean and sigma overall. */
export function histogramSvg(chart: CharacteristicChart, width: number, height: number): string {
  const d = chart.characteristic.decimals;
  const imr = chart.characteristic.chartType === 'imr';
  const values = chart.points.filter((p) => !p.excluded).flatMap((p) => (imr ? [p.location] : p.values));
  const cap = chart.capability;
  const spec = chart.spec;
  const limits = [spec?.lsl, spec?.usl].filter((v): v is number => v !== null && v !== undefined);
  const lo = Math.min(...values, ...limits);
  const hi = Math.max(...values, ...limits);
  const bins = binCount(values.length);
  const w = (hi - lo || 1) / bins;
  const counts = new Array<number>(bins).fill(0);
  for (const v of values) counts[Math.min(bins - 1, Math.floor((v - lo) / w))]++;
  // The bars as one outline: up and down each bin edge.
  const outline: [number, number][] = [[lo, 0]];
  counts.forEach((c, i) => outline.push([lo + i * w, c], [lo + (i + 1) * w, c]));
  outline.push([hi, 0]);
  const model: [number, number][] = [];
  if (cap?.mean !== null && cap?.mean !== undefined && cap.sigmaOverall) {
    const s = cap.sigmaOverall;
    for (let k = 0; k <= 80; k++) {
      const x = lo - w + ((hi - lo + 2 * w) * k) / 80;
      model.push([x, (values.length * w * Math.exp(-0.5 * ((x - cap.mean) / s) ** 2)) / (s * Math.sqrt(2 * Math.PI))]);
    }
  }
  const specLines = [
    spec?.lsl !== null && spec?.lsl !== undefined ? { xAxis: spec.lsl, name: 'LSL' } : null,
    spec?.usl !== null && spec?.usl !== undefined ? { xAxis: spec.usl, name: 'USL' } : null,
  ].filter((x) => x !== null);
  return render(
    {
      grid: { left: 58, right: 30, top: 28, bottom: 30 },
      legend: { top: 0, left: 'center', itemWidth: 28, itemHeight: 8, textStyle: text, data: ['Results', 'Normal model (sigma overall)'] },
      xAxis: {
        type: 'value',
        min: lo - w,
        max: hi + w,
        name: chart.characteristic.unit,
        nameLocation: 'middle',
        nameGap: 18,
        axisLabel: { ...text, formatter: (v: number) => formatFigure(v, d) },
        splitLine: { show: false },
      },
      yAxis: { type: 'value', name: 'Count', nameLocation: 'middle', nameGap: 40, axisLabel: text, minInterval: 1, splitLine: { lineStyle: { color: '#dddddd', width: 0.5 } } },
      series: [
        {
          name: 'Results',
          type: 'line',
          data: outline,
          symbol: 'none',
          lineStyle: style('values'),
          itemStyle: { color: '#000000' },
          areaStyle: { color: '#d0d0d0' },
          markLine: specLines.length
            ? { symbol: 'none', silent: true, lineStyle: style('spec'), label: { ...text, formatter: (p: { name: string }) => p.name, position: 'end' }, data: specLines }
            : undefined,
        },
        { name: 'Normal model (sigma overall)', type: 'line', smooth: true, symbol: 'none', data: model, lineStyle: style('model'), itemStyle: { color: lineKinds.model.colour } },
      ],
    },
    width,
    height,
  );
}
