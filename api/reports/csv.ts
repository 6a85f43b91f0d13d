// A capability report as CSV (@shared/csv: BOM, CRLF, formula cells neutralised): a header block of
// label–value rows with the report's figures, then one row per subgroup (lot). The product CSV puts a
// summary block first, then each characteristic's block and rows, separated by an empty row.
import { once } from 'node:events';
import type { Writable } from 'node:stream';
import type { Database } from '@api/db/client';
import { CSV_BOM, csvRow, type CsvValue } from '@shared/csv';
import { csvFigure } from '@shared/figures';
import { signalName } from '@shared/spc';
import type { CapabilityReportQuery } from '@shared/schemas/reports';
import { plantIso } from '@shared/time';
import { loadCapabilityReport, type CapabilityReport, type CharacteristicReport } from './capability';
import { resolveReportScope } from './scope';

/** Writes text and waits while the stream's buffer is full, so a long report never piles up in memory. */
async function put(out: Writable, text: string): Promise<void> {
  if (!out.write(text)) await once(out, 'drain');
}

const index = (v: number | null | undefined) => csvFigure(v, 3);
const interval = (ci: [number, number] | null | undefined) => (ci ? `${index(ci[0])} to ${index(ci[1])}` : null);

function headerRows(report: CapabilityReport): CsvValue[][] {
  const { scope } = report;
  return [
    ['Capability report', scope.product.code],
    ['Plant', scope.plant.name],
    ['Product', `${scope.product.code} ${scope.product.name}`],
    ['Period from (plant day)', scope.period.from],
    ['Period to (plant day, inclusive)', scope.period.to],
    ['Time zone', scope.plant.clock.timeZone],
    ['Input SHA-256', report.inputHash],
  ];
}

/** One characteristic's header block and subgroup rows. */
function characteristicRows(r: CharacteristicReport, timeZone: string): CsvValue[][] {
  const { chart } = r;
  const c = chart.characteristic;
  const cap = chart.capability;
  const d = c.decimals;
  const figure = (v: number | null | undefined) => csvFigure(v, d);
  const sigma = (v: number | null | undefined) => csvFigure(v, d + 1);
  const rows: CsvValue[][] = [
    ['Characteristic', c.code, c.name],
    ['Unit', c.unit],
    ['Test method', `${r.testMethod.code} ${r.testMethod.name}`, r.testMethod.standard],
    ['Specification revision used', chart.spec?.revision ?? null],
    ['LSL', figure(chart.spec?.lsl)],
    ['USL', figure(chart.spec?.usl)],
    ['Target', figure(chart.spec?.target)],
    ...r.specRevisions.map((s): CsvValue[] => [`Specification revision ${s.revision} in force from`, plantIso(s.effectiveFrom, timeZone), `LSL ${figure(s.lsl)}`, `USL ${figure(s.usl)}`]),
    ['Control limits', chart.limits.source === 'frozen' ? `frozen (revision ${r.limitsRevision})` : 'trial (from the period)'],
    ['Centre line', figure(chart.limits.location.center)],
    ['UCL', figure(chart.limits.location.ucl)],
    ['LCL', figure(chart.limits.location.lcl)],
    ['Results (n)', cap?.n ?? 0],
    ['Subgroups', chart.points.length],
    ['Subgroups excluded', chart.points.filter((p) => p.excluded).length],
    ['Mean', figure(cap?.mean)],
    ['Sigma within', sigma(cap?.sigmaWithin)],
    ['Sigma overall', sigma(cap?.sigmaOverall)],
    ['Cp', index(cap?.cp), interval(cap?.cpCi95)],
    ['Cpk', index(cap?.cpk), interval(cap?.cpkCi95)],
    ['Pp', index(cap?.pp), interval(cap?.ppCi95)],
    ['Ppk', index(cap?.ppk), interval(cap?.ppkCi95)],
    ['Expected ppm (within)', csvFigure(cap?.ppmExpectedWithin, 0)],
    ['Expected ppm (overall)', csvFigure(cap?.ppmExpected, 0)],
    ['Observed ppm', csvFigure(cap?.ppmObserved, 0)],
    ['Normality: Anderson-Darling A*2', csvFigure(cap?.normality?.adjusted, 3), 'p', csvFigure(cap?.normality?.p, 4)],
    ['Signals in the period', r.signals.length, r.signals.filter((s) => s.status !== 'closed').length ? `${r.signals.filter((s) => s.status !== 'closed').length} open` : null],
    ['NCRs touching it', r.ncrs.map((n) => n.number).join('; ') || 0],
    ['Characteristic input SHA-256', r.inputHash],
    ...chart.reasons.map((w): CsvValue[] => ['Warning', w]),
  ];
  if (chart.points.length === 0) {
    rows.push(['No results in this period']);
    return rows;
  }
  const width = Math.max(...chart.points.map((p) => p.values.length));
  rows.push([]);
  rows.push([
    'lot', 'produced_at', 'shift', 'n',
    ...Array.from({ length: width }, (_, i) => `value_${i + 1}`),
    'subgroup_mean', 'dispersion', 'centre_line', 'ucl', 'lcl', 'excluded', 'exclusion_reason', 'out_of_spec', 'signals',
  ]);
  for (const p of chart.points) {
    rows.push([
      p.lotNumber, plantIso(p.producedAt, timeZone), p.shift, p.n,
      ...Array.from({ length: width }, (_, i) => (i < p.values.length ? figure(p.values[i]) : null)),
      csvFigure(p.location, d + 1), csvFigure(p.dispersion, d + 1), figure(p.center), figure(p.ucl), figure(p.lcl),
      p.excluded ? 'yes' : 'no', p.exclusionReason, p.outOfSpec ? 'yes' : 'no', p.rules.map(signalName).join('; ') || null,
    ]);
  }
  return rows;
}

async function putRows(out: Writable, rows: CsvValue[][]): Promise<void> {
  // A few hundred rows at a time: one write per row would cost a call each, one for all a large string.
  for (let i = 0; i < rows.length; i += 500) await put(out, rows.slice(i, i + 500).map(csvRow).join(''));
}

/** One characteristic's CSV (header block and subgroup rows) to `out`, which stays open. */
export async function writeCharacteristicCsv(db: Database, q: { characteristicId: number; from: string; to: string }, out: Writable): Promise<void> {
  const scope = await resolveReportScope(db, { characteristic: q.characteristicId, from: q.from, to: q.to });
  const report = await loadCapabilityReport(db, scope);
  await put(out, CSV_BOM);
  await putRows(out, [...headerRows(report), [], ...characteristicRows(report.characteristics[0], scope.plant.clock.timeZone)]);
}

/** A report's CSV — the summary block, then each characteristic's block and rows — to `out`, which stays open. */
export async function writeCapabilityCsv(db: Database, query: CapabilityReportQuery, out: Writable): Promise<{ inputHash: string }> {
  const report = await loadCapabilityReport(db, await resolveReportScope(db, query));
  await writeReportCsv(report, out);
  return { inputHash: report.inputHash };
}

async function writeReportCsv(report: CapabilityReport, out: Writable): Promise<void> {
  const zone = report.scope.plant.clock.timeZone;
  await put(out, CSV_BOM);
  await putRows(out, headerRows(report));
  if (report.characteristics.length === 0) await putRows(out, [['No characteristics in this report']]);
  for (const c of report.characteristics) await putRows(out, [[], ...characteristicRows(c, zone)]);
}
