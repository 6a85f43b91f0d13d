// Reading a characteristic's chart from the database: its settings, exclusions, limit revisions,
// specification revisions, values and process events (loadChartInputs), and its frozen-limit history.
// The chart itself is assembled without I/O in chart-assembly.ts.
import { desc, eq, sql } from 'drizzle-orm';
import { startOfDay, subDays } from 'date-fns';
import { tz } from '@date-fns/tz';
import type { ChartType } from '@shared/spc';
import type { ChartPeriod, LimitRevisionRecord } from '@shared/schemas/charts';
import { controlLimitRevisions, users } from '../db/schema';
import { buildChart, type CharacteristicChart, type CharacteristicRow, type ChartInputs, type ChartWindow, type LotSubgroup } from './chart-assembly';
import type { Executor } from './db';
import { DomainError } from './errors';

type MetaRow = CharacteristicRow & {
  exclusions: { lotId: number; reason: string }[] | null;
  revisions: { id: number; revision: number; chartType: ChartType; center: number; sigmaWithin: number; baselineFrom: string; baselineTo: string; createdAt: string; createdByName: string | null; reason: string }[] | null;
  specs: { revision: number; lsl: number | null; usl: number | null; target: number | null; effectiveFrom: string }[] | null;
};

/**
 * Reads a characteristic's chart inputs: its settings, exclusions, limit revision and
 * specifications in one query, its values in a second, and (unless left out) the process events.
 */
export async function loadChartInputs(db: Executor, characteristicId: number, window: ChartWindow = {}, now = new Date(), opts: { events?: boolean } = {}): Promise<ChartInputs | null> {
  const meta = await db.execute<MetaRow>(sql`
    select c.id, c.code, c.name, c.unit, c.chart_type, c.rule_set, c.subgroup_size, p.id as product_id, p.code as product_code,
           p.name as product_name, p.plant_id, p.line_id, pl.code as line_code, tm.decimals,
           (select json_agg(json_build_object('lotId', e.lot_id, 'reason', e.reason)) from point_exclusions e
             where e.characteristic_id = c.id and e.removed_at is null) as exclusions,
           (select json_agg(json_build_object('id', r.id, 'revision', r.revision, 'chartType', r.chart_type, 'center', r.center, 'sigmaWithin', r.sigma_within,
                                              'baselineFrom', r.baseline_from, 'baselineTo', r.baseline_to, 'createdAt', r.created_at, 'createdByName', u.name, 'reason', r.reason)
                            order by r.revision)
             from control_limit_revisions r left join users u on u.id = r.created_by
             where r.characteristic_id = c.id) as revisions,
           (select json_agg(json_build_object('revision', s.revision, 'lsl', s.lsl, 'usl', s.usl, 'target', s.target, 'effectiveFrom', s.effective_from)
                            order by s.effective_from, s.revision)
             from spec_limits s where s.characteristic_id = c.id) as specs
    from characteristics c
    join products p on p.id = c.product_id
    join test_methods tm on tm.id = c.test_method_id
    left join production_lines pl on pl.id = p.line_id
    where c.id = ${characteristicId}`);
  const row = meta.rows[0];
  if (!row) return null;
  const { exclusions, revisions, specs, ...characteristic } = row;

  const from = window.from ? sql`and l.produced_at >= ${window.from.toISOString()}::timestamptz` : sql``;
  const to = window.to ? sql`and l.produced_at <= ${window.to.toISOString()}::timestamptz` : sql``;
  // One row per value, grouped into lots here. The lateral lookup (kept apart by OFFSET 0) reads
  // only the characteristic's own lots by primary key instead of hashing every lot of the plant.
  const valueRows = await db.execute<{ lot_id: number; lot_number: string; produced_ms: number; shift: string | null; value: number; entered_ms: number }>(sql`
    select m.lot_id, l.lot_number, (extract(epoch from l.produced_at) * 1000)::float8 as produced_ms, l.shift, m.value,
           (extract(epoch from m.created_at) * 1000)::float8 as entered_ms
    from measurements m cross join lateral (select lot_number, produced_at, shift from lots where id = m.lot_id offset 0) l
    where m.characteristic_id = ${characteristicId} and m.voided_at is null ${from} ${to}
    order by l.produced_at, l.lot_number collate "C", m.replicate`);
  const lotsOut: LotSubgroup[] = [];
  let current: LotSubgroup | null = null;
  for (const r of valueRows.rows) {
    if (current === null || current.lotId !== r.lot_id) {
      current = { lotId: r.lot_id, lotNumber: r.lot_number, producedAt: new Date(Number(r.produced_ms)), shift: r.shift, values: [], lastEnteredAt: new Date(Number(r.entered_ms)) };
      lotsOut.push(current);
    }
    current.values.push(Number(r.value));
    const entered = Number(r.entered_ms);
    if (entered > current.lastEnteredAt.getTime()) current.lastEnteredAt = new Date(entered);
  }

  const eventsFrom = window.from ?? lotsOut[0]?.producedAt ?? null;
  const eventsTo = window.to ?? now;
  const eventRows =
    opts.events !== false && eventsFrom
      ? await db.execute<{ id: number; occurred_at: Date; title: string; description: string | null }>(sql`
          select id, occurred_at, title, description from process_events
          where plant_id = ${characteristic.plant_id}
            and (line_id is null or line_id = ${characteristic.line_id})
            and (product_id is null or product_id = ${characteristic.product_id})
            and occurred_at >= ${eventsFrom.toISOString()}::timestamptz and occurred_at <= ${eventsTo.toISOString()}::timestamptz
          order by occurred_at, id`)
      : { rows: [] };

  return {
    characteristic,
    lots: lotsOut,
    exclusions: new Map((exclusions ?? []).map((e) => [e.lotId, e.reason])),
    revisions: (revisions ?? []).map((r) => ({ ...r, baselineFrom: new Date(r.baselineFrom), baselineTo: new Date(r.baselineTo), createdAt: new Date(r.createdAt) })),
    specs: (specs ?? []).map((s) => ({ revision: s.revision, lsl: s.lsl, usl: s.usl, target: s.target, effectiveFrom: new Date(s.effectiveFrom) })),
    events: eventRows.rows.map((e) => ({ id: e.id, occurredAt: new Date(e.occurred_at).toISOString(), title: e.title, description: e.description })),
    now,
    window,
  };
}

/** What a chart request asks for: a period, a lot to show, or a window of from and to. */
export interface ChartRequest {
  period?: ChartPeriod;
  lot?: string;
  from?: Date;
  to?: Date;
}

/**
 * The window a chart request stands for. The default is the period since the frozen limits in force
 * apply, so a chart never opens mixing the history before and after a process change with limits from
 * after it; all history when the limits are trial ones. A lot alone opens the default period if that holds
 * the lot, else the shortest period of whole plant days that does (all history at most). The day periods
 * count back from the start of the plant's day, so a chart stays one cached window all day.
 */
export async function resolveChartWindow(db: Executor, characteristicId: number, request: ChartRequest, now = new Date()): Promise<ChartWindow> {
  if (!request.period && (request.from || request.to)) return { from: request.from, to: request.to };
  const found = await db.execute<{ time_zone: string; limits_from: Date | null; lot_produced_at: Date | null }>(sql`
    select p.time_zone,
           (select r.baseline_from from control_limit_revisions r
             where r.characteristic_id = c.id and r.chart_type = c.chart_type
               and r.revision = (select max(revision) from control_limit_revisions where characteristic_id = c.id)) as limits_from,
           ${request.lot ? sql`(select l.produced_at from lots l where l.lot_number = ${request.lot})` : sql`null::timestamptz`} as lot_produced_at
    from characteristics c join products pr on pr.id = c.product_id join plants p on p.id = pr.plant_id
    where c.id = ${characteristicId}`);
  const row = found.rows[0];
  if (!row) throw new DomainError('not-found', `Characteristic ${characteristicId} not found`);
  const zone = tz(row.time_zone);
  const startOf = (period: ChartPeriod): Date | null => {
    if (period === 'all') return null;
    if (period === 'limits') return row.limits_from ? new Date(row.limits_from) : null;
    return subDays(startOfDay(now, { in: zone }), Number(period), { in: zone });
  };
  const windowOf = (period: ChartPeriod): ChartWindow => {
    const from = startOf(period);
    // Under trial limits "since the limits" is all history, and says so.
    return from ? { from, period } : { period: 'all' };
  };
  if (request.period) return windowOf(request.period);
  const lotAt = row.lot_produced_at ? new Date(row.lot_produced_at).getTime() : null;
  if (lotAt === null) return windowOf('limits');
  const holds = (period: ChartPeriod) => (startOf(period)?.getTime() ?? -Infinity) <= lotAt;
  if (holds('limits')) return windowOf('limits');
  return windowOf((['30', '90', '182'] as const).find(holds) ?? 'all');
}

/** The chart of one characteristic over a window of production dates (all of it by default). */
export async function computeCharacteristicChart(db: Executor, characteristicId: number, window: ChartWindow = {}): Promise<CharacteristicChart> {
  const inputs = await loadChartInputs(db, characteristicId, window);
  if (!inputs) throw new DomainError('not-found', `Characteristic ${characteristicId} not found`);
  return buildChart(inputs).chart;
}

/** A frozen-limit revision as stored: the answer's record (shared/schemas/charts.ts) with its instants as Dates, and who froze it. */
export type LimitRevision = Omit<LimitRevisionRecord, 'baselineFrom' | 'baselineTo' | 'createdAt' | 'supersededAt'> & {
  baselineFrom: Date;
  baselineTo: Date;
  createdAt: Date;
  supersededAt: Date | null;
  createdBy: number | null;
};

/** Every frozen-limit revision of a characteristic, newest first. */
export async function limitRevisions(db: Executor, characteristicId: number): Promise<LimitRevision[]> {
  return db
    .select({
      id: controlLimitRevisions.id,
      revision: controlLimitRevisions.revision,
      chartType: controlLimitRevisions.chartType,
      subgroupSize: controlLimitRevisions.subgroupSize,
      center: controlLimitRevisions.center,
      sigmaWithin: controlLimitRevisions.sigmaWithin,
      locationUcl: controlLimitRevisions.locationUcl,
      locationLcl: controlLimitRevisions.locationLcl,
      dispersionCenter: controlLimitRevisions.dispersionCenter,
      dispersionUcl: controlLimitRevisions.dispersionUcl,
      dispersionLcl: controlLimitRevisions.dispersionLcl,
      baselineFrom: controlLimitRevisions.baselineFrom,
      baselineTo: controlLimitRevisions.baselineTo,
      baselinePoints: controlLimitRevisions.baselinePoints,
      reason: controlLimitRevisions.reason,
      createdBy: controlLimitRevisions.createdBy,
      createdByName: users.name,
      createdAt: controlLimitRevisions.createdAt,
      supersededAt: controlLimitRevisions.supersededAt,
    })
    .from(controlLimitRevisions)
    .leftJoin(users, eq(users.id, controlLimitRevisions.createdBy))
    .where(eq(controlLimitRevisions.characteristicId, characteristicId))
    .orderBy(desc(controlLimitRevisions.revision));
}
