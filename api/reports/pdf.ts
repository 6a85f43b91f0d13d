// The capability report as an A4 PDF (pdfkit): for a product a summary page first, then one section per
// characteristic — what was measured and how, the specification and limits in force, the figures with
// their 95 % intervals, the engine's cautions, the control chart and the histogram (echarts SVG placed as
// vectors), the signals with how each was closed, the NCRs, the limit revisions and the exclusions. Every
// page ends with who made the report and when (plant time, zone named), page N of M and the SHA-256 of
// the report's input, so two printed copies can be compared.
import { createRequire } from 'node:module';
import type { Writable } from 'node:stream';
import PDFDocument from 'pdfkit';
import SVGtoPDF from 'svg-to-pdfkit';
import type { Database } from '@api/db/client';
import { formatFigure, formatQuantity } from '@shared/figures';
import { alarmOutcomeWords, alarmStatusWords, type AlarmOutcome, type AlarmStatus } from '@shared/schemas/alarms';
import { causeCategoryWords, type CauseCategory } from '@shared/schemas/causes';
import { ncrStatusWords, type NcrStatus } from '@shared/schemas/ncrs';
import type { CapabilityReportQuery } from '@shared/schemas/reports';
import { chartTypeLabels, signalName, type Interval } from '@shared/spc';
import { formatPlantDateTime, formatPlantDay, zoneAbbreviation, type PlantClock } from '@shared/time';
import { loadCapabilityReport, type CapabilityReport, type CharacteristicReport } from './capability';
import { controlChartSvg, histogramSvg, lineKinds } from './figures-svg';
import { resolveReportScope } from './scope';

const require = createRequire(import.meta.url);
/** The web app's own typefaces (@fontsource), embedded so the report reads like the screens on any machine. */
const fonts = {
  regular: require.resolve('@fontsource/inter/files/inter-latin-400-normal.woff'),
  bold: require.resolve('@fontsource/inter/files/inter-latin-700-normal.woff'),
  mono: require.resolve('@fontsource/roboto-mono/files/roboto-mono-latin-400-normal.woff'),
};

const MARGIN = 48;
const FOOTER = 34;
const PAGE_WIDTH = 595.28;
const WIDTH = PAGE_WIDTH - 2 * MARGIN;

type Doc = PDFKit.PDFDocument;

interface Context {
  doc: Doc;
  clock: PlantClock;
}

const index = (v: number | null | undefined) => formatFigure(v, 2);
const ci = (v: Interval | null | undefined) => (v ? `${index(v[0])} to ${index(v[1])}` : '–');

/** A heading kept on one page with the first `keep` points of what follows it. */
function heading(doc: Doc, text: string, size = 12, keep = 0): void {
  ensureRoom(doc, size * 3 + keep);
  doc.moveDown(0.6).font('bold').fontSize(size).fillColor('#000000').text(text, MARGIN, doc.y, { width: WIDTH });
  doc.moveDown(0.2).font('regular').fontSize(9);
}

function ensureRoom(doc: Doc, height: number): void {
  if (doc.y + height > doc.page.height - MARGIN - FOOTER) doc.addPage();
}

/** Rows of label and value, two columns. */
function facts(doc: Doc, rows: [string, string][]): void {
  doc.font('regular').fontSize(9);
  for (const [label, value] of rows) {
    const h = Math.max(doc.heightOfString(value, { width: WIDTH - 150 }), 11);
    ensureRoom(doc, h);
    const y = doc.y;
    doc.font('bold').text(label, MARGIN, y, { width: 145 });
    doc.font('regular').text(value, MARGIN + 150, y, { width: WIDTH - 150 });
    doc.y = Math.max(doc.y, y + h);
  }
}

/** A table with a header row; column widths in points, text wrapped inside each cell. */
function table(doc: Doc, head: string[], widths: number[], rows: string[][]): void {
  const line = (cells: string[], bold: boolean) => {
    doc.font(bold ? 'bold' : 'regular').fontSize(8);
    const h = Math.max(...cells.map((c, i) => doc.heightOfString(c || ' ', { width: widths[i] - 4 }))) + 3;
    if (doc.y + h > doc.page.height - MARGIN - FOOTER) {
      doc.addPage();
      if (!bold) line(head, true);
    }
    const y = doc.y;
    let x = MARGIN;
    cells.forEach((c, i) => {
      doc.text(c, x, y, { width: widths[i] - 4 });
      x += widths[i];
    });
    doc.y = y + h;
    doc.moveTo(MARGIN, doc.y - 1).lineTo(MARGIN + WIDTH, doc.y - 1).lineWidth(bold ? 0.8 : 0.3).strokeColor('#000000').stroke();
  };
  line(head, true);
  for (const r of rows) line(r, false);
  doc.x = MARGIN;
}

function paragraph(doc: Doc, text: string): void {
  doc.font('regular').fontSize(9);
  ensureRoom(doc, doc.heightOfString(text, { width: WIDTH }));
  doc.text(text, MARGIN, doc.y, { width: WIDTH });
}

function figure(doc: Doc, svg: string, height: number): void {
  ensureRoom(doc, height + 6);
  const y = doc.y;
  SVGtoPDF(doc, svg, MARGIN, y, {
    width: WIDTH,
    height,
    assumePt: true,
    fontCallback: (_family: string, bold: boolean) => (bold ? 'bold' : 'regular'),
  });
  doc.y = y + height + 6;
  doc.x = MARGIN;
}

/** The key of the figures' line styles, drawn with the same dash patterns so a black-and-white print still tells them apart. */
function lineKey(doc: Doc): void {
  ensureRoom(doc, 14);
  const y = doc.y + 4;
  let x = MARGIN;
  const entries: [keyof typeof lineKinds, string][] = [
    ['values', 'values'],
    ['centre', 'centre line'],
    ['control', 'control limits'],
    ['spec', 'specification limits'],
    ['model', 'normal model'],
  ];
  doc.font('regular').fontSize(8);
  for (const [kind, label] of entries) {
    const k = lineKinds[kind];
    doc.save().moveTo(x, y).lineTo(x + 26, y).lineWidth(k.width).strokeColor(k.colour);
    if (k.dash) doc.dash(k.dash[0], { space: k.dash[1] });
    doc.stroke().restore();
    doc.text(label, x + 30, y - 4, { lineBreak: false });
    x += 34 + doc.widthOfString(label) + 12;
  }
  doc.y = y + 10;
  doc.x = MARGIN;
}

function closedWords(s: CharacteristicReport['signals'][number], clock: PlantClock): string {
  if (s.status !== 'closed') return alarmStatusWords[s.status as AlarmStatus] ?? s.status;
  if (s.resolution === 'data-changed') return `Closed by the engine: the data changed${s.closedAt ? ` (${formatPlantDateTime(s.closedAt, clock)})` : ''}`;
  const outcome = s.outcome ? (alarmOutcomeWords[s.outcome as AlarmOutcome] ?? s.outcome) : 'Closed';
  const cause = s.causeCategory ? ` (${causeCategoryWords[s.causeCategory as CauseCategory]?.label ?? s.causeCategory})` : '';
  const who = [s.closedBy, s.closedAt ? formatPlantDateTime(s.closedAt, clock) : null].filter(Boolean).join(', ');
  return `${outcome}${cause}${s.closeNote ? `: ${s.closeNote}` : ''}${who ? ` — ${who}` : ''}`;
}

function characteristicSection(ctx: Context, report: CapabilityReport, r: CharacteristicReport): void {
  const { doc, clock } = ctx;
  const { chart } = r;
  const c = chart.characteristic;
  const cap = chart.capability;
  const d = c.decimals;
  const q = (v: number | null | undefined) => formatQuantity(v, d, c.unit);
  const sigma = (v: number | null | undefined) => formatQuantity(v, d + 1, c.unit);
  const spec = chart.spec;

  heading(doc, `${c.code} — ${c.name}`, 14);
  facts(doc, [
    ['Plant', report.scope.plant.name],
    ['Product', `${report.scope.product.code} ${report.scope.product.name}`],
    ['Characteristic', `${c.code} ${c.name} (${c.unit})`],
    ['Test method', `${r.testMethod.name} (${r.testMethod.code}), ${r.testMethod.standard}`],
    ['Period', `${formatPlantDay(report.scope.period.from, clock)} to ${formatPlantDay(report.scope.period.to, clock)}, plant days inclusive`],
    ['Chart', `${chartTypeLabels[c.chartType]}, subgroups of ${c.subgroupSize}`],
    [
      'Specification used',
      spec ? `revision ${spec.revision}: LSL ${q(spec.lsl)}, USL ${q(spec.usl)}, target ${q(spec.target)} (the revision in force now, as on the chart page)` : 'none in force',
    ],
    [
      'Specification in the period',
      r.specRevisions.length
        ? r.specRevisions.map((s) => `revision ${s.revision} from ${formatPlantDateTime(s.effectiveFrom, clock)}: LSL ${q(s.lsl)}, USL ${q(s.usl)}`).join('; ')
        : 'none in force',
    ],
    [
      'Control limits',
      chart.limits.source === 'frozen'
        ? `frozen, revision ${r.limitsRevision} by ${chart.limits.frozenBy ?? 'unknown'}: centre ${q(chart.limits.location.center)}, UCL ${q(chart.limits.location.ucl)}, LCL ${q(chart.limits.location.lcl)}`
        : `trial, from the period: centre ${q(chart.limits.location.center)}, UCL ${q(chart.limits.location.ucl)}, LCL ${q(chart.limits.location.lcl)}`,
    ],
  ]);

  if (chart.points.length === 0) {
    heading(doc, 'Results');
    paragraph(doc, 'No results in this period.');
  } else {
    heading(doc, 'Figures');
    const excluded = chart.points.filter((p) => p.excluded).length;
    table(
      doc,
      ['Figure', 'Value', '95 % interval', 'Figure', 'Value'],
      [80, 70, 110, 140, WIDTH - 400],
      [
        ['Cp', index(cap?.cp), ci(cap?.cpCi95), 'Results (n)', String(cap?.n ?? 0)],
        ['Cpk', index(cap?.cpk), ci(cap?.cpkCi95), 'Subgroups', `${chart.points.length}${excluded ? ` (${excluded} excluded)` : ''}`],
        ['Pp', index(cap?.pp), ci(cap?.ppCi95), 'Mean', q(cap?.mean)],
        ['Ppk', index(cap?.ppk), ci(cap?.ppkCi95), 'Sigma within', sigma(cap?.sigmaWithin)],
        ['Expected ppm', `${formatFigure(cap?.ppmExpectedWithin, 0)} within`, `${formatFigure(cap?.ppmExpected, 0)} overall`, 'Sigma overall', sigma(cap?.sigmaOverall)],
        [
          'Observed ppm',
          formatFigure(cap?.ppmObserved, 0),
          '',
          'Normality (Anderson–Darling)',
          cap?.normality?.p !== null && cap?.normality?.p !== undefined
            ? `A*² ${formatFigure(cap.normality.adjusted, 3)}, p ${cap.normality.p < 0.001 ? '< 0.001' : formatFigure(cap.normality.p, 3)}`
            : (cap?.normality?.reason ?? '–'),
        ],
      ],
    );
    if (chart.reasons.length) {
      heading(doc, 'Cautions', 10);
      for (const w of chart.reasons) paragraph(doc, `• ${w}`);
    }
    heading(doc, 'Control chart', 10, 216);
    figure(doc, controlChartSvg(chart, WIDTH, 210), 210);
    heading(doc, 'Histogram against the specification', 10, 190);
    figure(doc, histogramSvg(chart, WIDTH, 170), 170);
    lineKey(doc);
  }

  heading(doc, 'Signals in the period', 10);
  if (r.signals.length === 0) paragraph(doc, 'None.');
  else {
    table(
      doc,
      ['Lot', 'Produced', 'Signal', 'How it was closed'],
      [70, 75, 120, WIDTH - 265],
      r.signals.map((s) => [s.lotNumber, formatPlantDateTime(s.producedAt, clock), signalName(s.rule), closedWords(s, clock)]),
    );
    if (r.signalsCut) paragraph(doc, `Only the first ${r.signals.length} signals are listed.`);
  }

  heading(doc, 'NCRs touching it', 10);
  if (r.ncrs.length === 0) paragraph(doc, 'None.');
  else
    table(
      doc,
      ['NCR', 'Title', 'Severity', 'Status', 'Raised', 'Closed'],
      [62, WIDTH - 342, 50, 70, 80, 80],
      r.ncrs.map((n) => [n.number, n.title, n.severity, ncrStatusWords[n.status as NcrStatus] ?? n.status, formatPlantDateTime(n.createdAt, clock), n.closedAt ? formatPlantDateTime(n.closedAt, clock) : '–']),
    );

  heading(doc, 'Control limit revisions', 10);
  if (r.limitRevisions.length === 0) paragraph(doc, 'None frozen or in force in this period.');
  else
    table(
      doc,
      ['Revision', 'Frozen', 'Baseline', 'Centre / UCL / LCL', 'Reason'],
      [48, 95, 120, 110, WIDTH - 373],
      r.limitRevisions.map((l) => [
        String(l.revision),
        `${formatPlantDateTime(l.createdAt, clock)}${l.createdByName ? `, ${l.createdByName}` : ''}`,
        `${formatPlantDateTime(l.baselineFrom, clock)} to ${formatPlantDateTime(l.baselineTo, clock)}`,
        `${formatFigure(l.center, d)} / ${formatFigure(l.locationUcl, d)} / ${formatFigure(l.locationLcl, d)}`,
        l.reason,
      ]),
    );

  heading(doc, 'Exclusions', 10);
  if (r.exclusions.length === 0) paragraph(doc, 'None.');
  else
    table(
      doc,
      ['Lot', 'Produced', 'Excluded', 'Reason'],
      [70, 80, 120, WIDTH - 270],
      r.exclusions.map((e) => [e.lotNumber, formatPlantDateTime(e.producedAt, clock), `${formatPlantDateTime(e.at, clock)}${e.by ? `, ${e.by}` : ''}`, e.reason]),
    );
}

function summaryPage(ctx: Context, report: CapabilityReport): void {
  const { doc, clock } = ctx;
  const { scope } = report;
  heading(doc, `Capability report — ${scope.product.code} ${scope.product.name}`, 16);
  facts(doc, [
    ['Plant', scope.plant.name],
    ['Product', `${scope.product.code} ${scope.product.name}`],
    ['Period', `${formatPlantDay(scope.period.from, clock)} to ${formatPlantDay(scope.period.to, clock)}, plant days inclusive (${clock.timeZone})`],
    ['Characteristics', String(report.characteristics.length)],
  ]);
  heading(doc, 'Summary');
  if (report.characteristics.length === 0) {
    paragraph(doc, 'No characteristics in this report.');
    return;
  }
  table(
    doc,
    ['Characteristic', 'n', 'Subgroups', 'Cp', 'Cpk', 'Pp', 'Ppk', 'Signals', 'NCRs', 'Cautions'],
    [130, 34, 50, 34, 34, 34, 34, 40, 34, WIDTH - 424],
    report.characteristics.map((r) => {
      const cap = r.chart.capability;
      const open = r.signals.filter((s) => s.status !== 'closed').length;
      return [
        `${r.chart.characteristic.code} ${r.chart.characteristic.name}`,
        String(cap?.n ?? 0),
        String(r.chart.points.length),
        index(cap?.cp),
        index(cap?.cpk),
        index(cap?.pp),
        index(cap?.ppk),
        `${r.signals.length}${open ? ` (${open} open)` : ''}`,
        String(r.ncrs.length),
        r.chart.points.length === 0 ? 'No results in this period' : cap?.preliminary ? 'preliminary' : r.chart.reasons.length ? `${r.chart.reasons.length} caution(s)` : '–',
      ];
    }),
  );
  paragraph(doc, '');
  paragraph(
    doc,
    'Indices are computed from the kept (not excluded) results of the period against the specification revision in force when the report was made, with sigma within from the control chart of the period — the same computation as the chart page. Intervals are 95 % confidence intervals.',
  );
}

function footers(doc: Doc, generatedBy: string, at: Date, clock: PlantClock, hash: string): number {
  const range = doc.bufferedPageRange();
  const total = range.count;
  for (let i = 0; i < total; i++) {
    doc.switchToPage(range.start + i);
    // Writing below the bottom margin would start a page of its own.
    const bottom = doc.page.margins.bottom;
    doc.page.margins.bottom = 0;
    const y = doc.page.height - MARGIN - FOOTER + 10;
    doc.moveTo(MARGIN, y - 4).lineTo(MARGIN + WIDTH, y - 4).lineWidth(0.4).strokeColor('#000000').stroke();
    doc.font('regular').fontSize(7.5).fillColor('#000000');
    doc.text(`Generated by ${generatedBy} on ${formatPlantDateTime(at, clock)} ${zoneAbbreviation(clock.timeZone, at)} (${clock.timeZone})`, MARGIN, y, { width: WIDTH - 80, lineBreak: false });
    doc.text(`Page ${i + 1} of ${total}`, MARGIN + WIDTH - 80, y, { width: 80, align: 'right', lineBreak: false });
    doc.font('mono').fontSize(7).text(`Input data SHA-256 ${hash}`, MARGIN, y + 11, { width: WIDTH, lineBreak: false });
    doc.page.margins.bottom = bottom;
  }
  return total;
}

/**
 * Writes the capability report of the query as a PDF to `out`, which it leaves open (the caller ends it:
 * the route's response, or an entry of the audit pack). Resolves once every byte has been written.
 */
export async function writeCapabilityPdf(
  db: Database,
  query: CapabilityReportQuery,
  generatedBy: string,
  out: Writable,
  opts: { now?: Date } = {},
): Promise<{ inputHash: string; pages: number }> {
  const report = await loadCapabilityReport(db, await resolveReportScope(db, query));
  const at = opts.now ?? new Date();
  const clock = report.scope.plant.clock;
  const single = query.characteristic !== undefined;
  const doc = new PDFDocument({
    size: 'A4',
    margins: { top: MARGIN, left: MARGIN, right: MARGIN, bottom: MARGIN + FOOTER },
    bufferPages: true,
    info: {
      Title: `Capability report ${single ? report.characteristics[0].chart.characteristic.code : report.scope.product.code} ${report.scope.period.from} to ${report.scope.period.to}`,
      Author: generatedBy,
      Subject: `${report.scope.plant.name}, input SHA-256 ${report.inputHash}`,
      CreationDate: at,
    },
  });
  doc.registerFont('regular', fonts.regular);
  doc.registerFont('bold', fonts.bold);
  doc.registerFont('mono', fonts.mono);
  const done = new Promise<void>((resolve, reject) => {
    doc.on('end', resolve);
    doc.on('error', reject);
  });
  doc.pipe(out, { end: false });

  const ctx: Context = { doc, clock };
  if (single) characteristicSection(ctx, report, report.characteristics[0]);
  else {
    summaryPage(ctx, report);
    for (const r of report.characteristics) {
      doc.addPage();
      characteristicSection(ctx, report, r);
    }
  }
  const pages = footers(doc, generatedBy, at, clock, report.inputHash);
  doc.end();
  await done;
  return { inputHash: report.inputHash, pages };
}
