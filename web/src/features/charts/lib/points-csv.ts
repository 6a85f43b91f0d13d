// The chart's points as CSV (RFC 4180: comma, dot decimals, CRLF, quotes where needed), one row per
// point with one column per replicate, for a spreadsheet or an audit file. A point is named by its lot
// and production time (plant time with its offset); figures keep the characteristic's decimals, a mean
// of several replicates and a range or standard deviation one more, as the chart shows them.
import type { CharacteristicChart } from '@shared/schemas/charts';
import { csvFigure } from '@shared/figures';
import { plantIso } from '@shared/time';

function field(value: string | number | boolean | null): string {
  if (value === null) return '';
  const text = String(value);
  return /[",\r\n]|^\s|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

const columnNames = {
  'xbar-r': { location: 'mean', dispersion: 'range' },
  'xbar-s': { location: 'mean', dispersion: 'stdev' },
  imr: { location: 'result', dispersion: 'moving_range' },
} as const;

export function pointsCsv(chart: CharacteristicChart, timeZone: string): string {
  const { chartType, decimals, subgroupSize } = chart.characteristic;
  const names = columnNames[chartType];
  const locationDecimals = decimals + (subgroupSize > 1 ? 1 : 0);
  const dispersionDecimals = decimals + 1;
  const replicates = chart.points.reduce((m, p) => Math.max(m, p.n), 0);
  const header = [
    'lot',
    'produced_at',
    'shift',
    'n',
    ...Array.from({ length: replicates }, (_, i) => `value_${i + 1}`),
    names.location,
    names.dispersion,
    'lcl',
    'ucl',
    `${names.dispersion}_ucl`,
    'out_of_spec',
    'excluded',
    'exclusion_reason',
    'rules',
  ];
  const lines = [header.map(field).join(',')];
  for (const p of chart.points) {
    const values = Array.from({ length: replicates }, (_, i) => (i < p.values.length ? csvFigure(p.values[i], decimals) : null));
    lines.push(
      [
        p.lotNumber,
        plantIso(p.producedAt, timeZone),
        p.shift,
        p.n,
        ...values,
        csvFigure(p.location, locationDecimals),
        csvFigure(p.dispersion, dispersionDecimals),
        csvFigure(p.lcl, locationDecimals),
        csvFigure(p.ucl, locationDecimals),
        csvFigure(p.dispersionUcl, dispersionDecimals),
        p.outOfSpec,
        p.excluded,
        p.exclusionReason,
        p.rules.join(' '),
      ]
        .map(field)
        .join(','),
    );
  }
  return `${lines.join('\r\n')}\r\n`;
}

/** Offers a text as a file download without a round trip to the server. */
export function downloadText(text: string, fileName: string, type = 'text/csv;charset=utf-8'): void {
  const url = URL.createObjectURL(new Blob([text], { type }));
  const link = document.createElement('a');
  link.href = url;
  link.download = fileName;
  document.body.append(link);
  link.click();
  link.remove();
  URL.revokeObjectURL(url);
}
