// A capability report's content for one characteristic: the chart of the period exactly as the chart
// endpoint computes it (the same cache, the same window), plus the records an auditor expects beside it —
// the test method, the specification revisions in force in the period, the frozen-limit revisions, the
// exclusions with their reasons, the signals with how each was closed, and the NCRs that touch it.
import { createHash } from 'node:crypto';
import { sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { limitRevisions, type LimitRevision } from '@api/spc/chart-load';
import { chartCacheFor } from '@api/routes/charts/chart-cache';
import type { CharacteristicChart } from '@shared/schemas/charts';
import type { CapabilityReportPreview, CharacteristicReportSummary } from '@shared/schemas/reports';
import type { ReportScope } from './scope';

/** A period holds a few signals a week; the caps keep a runaway history from making a report of thousands of pages. */
export const REPORT_MAX_SIGNALS = 500;
export const REPORT_MAX_NCRS = 200;

export interface ReportSignal {
  lotNumber: string;
  producedAt: Date;
  rule: string;
  description: string;
  status: string;
  outcome: string | null;
  causeCategory: string | null;
  closeNote: string | null;
  closedAt: Date | null;
  closedBy: string | null;
  resolution: string | null;
}

export interface ReportNcr {
  number: string;
  title: string;
  severity: string;
  status: string;
  createdAt: Date;
  closedAt: Date | null;
}

export interface ReportExclusion {
  lotNumber: string;
  producedAt: Date;
  reason: string;
  by: string | null;
  at: Date;
}

export interface ReportSpecRevision {
  revision: number;
  lsl: number | null;
  usl: number | null;
  target: number | null;
  effectiveFrom: Date;
  reason: string | null;
}

export interface CharacteristicReport {
  chart: CharacteristicChart;
  testMethod: { code: string; name: string; standard: string };
  specRevisions: ReportSpecRevision[];
  limitRevisions: LimitRevision[];
  /** The revision number (as the limit-revision history numbers them) of the frozen limits the chart uses; null under trial limits. */
  limitsRevision: number | null;
  exclusions: ReportExclusion[];
  signals: ReportSignal[];
  /** More signals than REPORT_MAX_SIGNALS: the list holds the first ones. */
  signalsCut: boolean;
  ncrs: ReportNcr[];
  /** The canonical serialisation of the input and its SHA-256. */
  canonical: string;
  inputHash: string;
}

export interface CapabilityReport {
  scope: ReportScope;
  characteristics: CharacteristicReport[];
  inputHash: string;
}

/**
 * The text the input hash is taken of: one JSON line per characteristic with its code, the window, the
 * specification and limits the figures use, and every subgroup (lot, production instant, values, excluded).
 * Key order is fixed by the arrays, so two copies of a report over the same data hash alike.
 */
export function canonicalInput(chart: CharacteristicChart): string {
  const l = chart.limits;
  return JSON.stringify([
    chart.characteristic.code,
    [chart.window.from, chart.window.to],
    chart.spec ? [chart.spec.revision, chart.spec.lsl, chart.spec.usl, chart.spec.target] : null,
    [l.source, l.revisionId, l.location.center, l.location.ucl, l.location.lcl, l.dispersion.center, l.dispersion.ucl, l.dispersion.lcl],
    chart.points.map((p) => [p.lotNumber, p.producedAt, p.values, p.excluded]),
  ]);
}

const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

/** The hash of a whole report: of its characteristics' canonical lines joined by line feeds (one characteristic: its own hash). */
export const reportHash = (lines: readonly string[]) => sha256(lines.join('\n'));

/** One characteristic's report over the scope's period. */
export async function loadCharacteristicReport(db: Database, scope: ReportScope, characteristicId: number): Promise<CharacteristicReport> {
  const { fromInstant: from, toInstant: to } = scope.period;
  const cached = await chartCacheFor(db).get(characteristicId, { from, to });
  const chart = cached.chart;
  const [method] = (
    await db.execute<{ code: string; name: string; standard: string }>(sql`
      select tm.code, tm.name, tm.standard from characteristics c join test_methods tm on tm.id = c.test_method_id where c.id = ${characteristicId}`)
  ).rows;

  // The revision in force at the period's start and every one that took effect within it.
  const specRevisions = (
    await db.execute<{ revision: number; lsl: number | null; usl: number | null; target: number | null; effective_from: Date; reason: string | null }>(sql`
      select s.revision, s.lsl, s.usl, s.target, s.effective_from, s.reason from spec_limits s
      where s.characteristic_id = ${characteristicId} and s.effective_from <= ${to}
        and not exists (select 1 from spec_limits later where later.characteristic_id = s.characteristic_id
                          and later.effective_from <= ${from} and (later.effective_from, later.revision) > (s.effective_from, s.revision))
      order by s.effective_from, s.revision`)
  ).rows.map((s) => ({ revision: s.revision, lsl: s.lsl, usl: s.usl, target: s.target, effectiveFrom: new Date(s.effective_from), reason: s.reason }));

  // Revisions that judged some of the period: frozen before its end and not replaced before its start.
  const allRevisions = await limitRevisions(db, characteristicId);
  const revisions = allRevisions
    .filter((r) => r.createdAt <= to && (r.supersededAt === null || r.supersededAt >= from))
    .reverse();

  const exclusions = (
    await db.execute<{ lot_number: string; produced_at: Date; reason: string; by: string | null; at: Date }>(sql`
      select l.lot_number, l.produced_at, e.reason, u.name as by, e.created_at as at
      from point_exclusions e join lots l on l.id = e.lot_id left join users u on u.id = e.created_by
      where e.characteristic_id = ${characteristicId} and e.removed_at is null and l.produced_at >= ${from} and l.produced_at <= ${to}
      order by l.produced_at, l.lot_number collate "C"
      limit ${REPORT_MAX_SIGNALS}`)
  ).rows.map((e) => ({ lotNumber: e.lot_number, producedAt: new Date(e.produced_at), reason: e.reason, by: e.by, at: new Date(e.at) }));

  const signalRows = (
    await db.execute<{
      lot_number: string; produced_at: Date; rule: string; description: string; status: string; outcome: string | null; cause_category: string | null;
      close_note: string | null; closed_at: Date | null; closed_by: string | null; resolution: string | null;
    }>(sql`
      select l.lot_number, l.produced_at, a.rule, a.description, a.status, a.outcome, a.cause_category, a.close_note, a.closed_at,
             u.name as closed_by, a.resolution
      from alarms a join lots l on l.id = a.lot_id left join users u on u.id = a.closed_by
      where a.characteristic_id = ${characteristicId} and a.rule <> 'capability' and l.produced_at >= ${from} and l.produced_at <= ${to}
      order by l.produced_at, l.lot_number collate "C", a.id
      limit ${REPORT_MAX_SIGNALS + 1}`)
  ).rows;
  const signals = signalRows.slice(0, REPORT_MAX_SIGNALS).map((a) => ({
    lotNumber: a.lot_number,
    producedAt: new Date(a.produced_at),
    rule: a.rule,
    description: a.description,
    status: a.status,
    outcome: a.outcome,
    causeCategory: a.cause_category,
    closeNote: a.close_note,
    closedAt: a.closed_at ? new Date(a.closed_at) : null,
    closedBy: a.closed_by,
    resolution: a.resolution,
  }));

  // Open at some time in the period, and linked to one of the characteristic's alarms or to a lot it measured in the period.
  const ncrs = (
    await db.execute<{ number: string; title: string; severity: string; status: string; created_at: Date; closed_at: Date | null }>(sql`
      select n.number, n.title, n.severity, n.status, n.created_at, n.closed_at from ncrs n
      where n.created_at <= ${to} and (n.closed_at is null or n.closed_at >= ${from})
        and (exists (select 1 from ncr_alarms na join alarms a on a.id = na.alarm_id where na.ncr_id = n.id and a.characteristic_id = ${characteristicId})
             or exists (select 1 from ncr_lots nl join lots l on l.id = nl.lot_id
                        where nl.ncr_id = n.id and l.produced_at >= ${from} and l.produced_at <= ${to}
                          and exists (select 1 from measurements m where m.lot_id = l.id and m.characteristic_id = ${characteristicId} and m.voided_at is null)))
      order by n.year, n.sequence
      limit ${REPORT_MAX_NCRS}`)
  ).rows.map((n) => ({ number: n.number, title: n.title, severity: n.severity, status: n.status, createdAt: new Date(n.created_at), closedAt: n.closed_at ? new Date(n.closed_at) : null }));

  const canonical = canonicalInput(chart);
  return {
    chart,
    testMethod: method,
    specRevisions,
    limitRevisions: revisions,
    limitsRevision: chart.limits.revisionId === null ? null : (allRevisions.find((l) => l.id === chart.limits.revisionId)?.revision ?? null),
    exclusions,
    signals,
    signalsCut: signalRows.length > REPORT_MAX_SIGNALS,
    ncrs,
    canonical,
    inputHash: sha256(canonical),
  };
}

/** Every characteristic of the scope, one after another (each reads its chart through the shared cache). */
export async function loadCapabilityReport(db: Database, scope: ReportScope): Promise<CapabilityReport> {
  const characteristics: CharacteristicReport[] = [];
  for (const c of scope.characteristics) characteristics.push(await loadCharacteristicReport(db, scope, c.id));
  return { scope, characteristics, inputHash: reportHash(characteristics.map((c) => c.canonical)) };
}

export function characteristicSummary(r: CharacteristicReport): CharacteristicReportSummary {
  const c = r.chart.characteristic;
  return {
    id: c.id,
    code: c.code,
    name: c.name,
    unit: c.unit,
    decimals: c.decimals,
    testMethod: r.testMethod,
    subgroups: r.chart.points.length,
    excluded: r.chart.points.filter((p) => p.excluded).length,
    spec: r.chart.spec,
    capability: r.chart.capability,
    warnings: r.chart.reasons,
    signals: { total: r.signals.length, open: r.signals.filter((s) => s.status !== 'closed').length },
    ncrs: r.ncrs.length,
    inputHash: r.inputHash,
  };
}

export function reportPreview(report: CapabilityReport): CapabilityReportPreview {
  const { scope } = report;
  return {
    plant: { name: scope.plant.name, timeZone: scope.plant.clock.timeZone },
    product: scope.product,
    period: { from: scope.period.from, to: scope.period.to, fromInstant: scope.period.fromInstant.toISOString(), toInstant: scope.period.toInstant.toISOString() },
    inputHash: report.inputHash,
    characteristics: report.characteristics.map(characteristicSummary),
  };
}
