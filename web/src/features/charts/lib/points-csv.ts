// The chart's points as CSV (shared/csv.ts: RFC 4180, UTF-8 with BOM, formula cells neutralised), one row per
// point with one column per replicate, for a spreadsheet or an audit file. A point is named by its lot
// and production time (plant time with its offset); figures keep the characteristic's decimals, a mean
// of several replicates and a range or standard deviation one more, as the chart shows them.
import type { CharacteristicChart } from '@shared/schemas/charts';
import { csvFigure } from '@shared/figures';
import { plantIso } from '@shared/time';
import { csvDocument, type CsvValue } from '@shared/csv';

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
  const rows: CsvValue[][] = [header];
  for (const p of chart.points) {
    const values = Array.from({ length: replicates }, (_, i) => (i < p.values.length ? csvFigure(p.values[i], decimals) : null));
    rows.push([
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
    ]);
  }
  return csvDocument(rows);
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
