import { Router } from 'express';
import { sql } from 'drizzle-orm';
import { limitWords, ruleDescriptions, signalName, statisticWords, type ChartType, type RuleId } from '@shared/spc';
import { formatQuantity } from '@shared/figures';
import type { AlarmChart, AlarmList, AlarmResolution, AlarmRule, AlarmSource, AlarmStatus, AlarmView } from '@shared/schemas/alarms';
import type { Database } from '@api/db/client';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { chartLink } from '@api/mail/compose';
import { alarmsInContext, OUT_OF_SPEC, signalOfRow, triageAlarm, type AlarmSignalColumns } from '@api/spc/alarms';
import { alarmIdParamsSchema, alarmNoteSchema, listAlarmsQuerySchema } from './schema';

/** One alarm as the list query reads it, before it becomes an AlarmView. */
type AlarmRow = AlarmSignalColumns & {
  id: number;
  characteristic_id: number;
  characteristic_code: string;
  characteristic_name: string;
  unit: string;
  decimals: number;
  chart_type: ChartType;
  product_code: string;
  line_code: string | null;
  lot_id: number;
  lot_number: string;
  produced_at: Date;
  rule: AlarmRule;
  chart: AlarmChart;
  late: boolean;
  source: AlarmSource;
  run_id: number | null;
  status: AlarmStatus;
  resolution: AlarmResolution | null;
  created_at: Date;
  detected_at: Date;
  updated_at: Date;
  acknowledged_at: Date | null;
  acknowledged_by: string | null;
  acknowledge_note: string | null;
  closed_at: Date | null;
  closed_by: string | null;
  close_note: string | null;
};

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
const isoOf = (d: Date) => new Date(d).toISOString();

function toView(r: AlarmRow, publicUrl: string): AlarmView {
  return {
    id: r.id,
    characteristic: { id: r.characteristic_id, code: r.characteristic_code, name: r.characteristic_name, unit: r.unit, decimals: r.decimals, productCode: r.product_code, lineCode: r.line_code },
    lot: { id: r.lot_id, lotNumber: r.lot_number, producedAt: isoOf(r.produced_at) },
    rule: r.rule,
    signal: signalName(r.rule),
    figure: {
      name: r.rule === OUT_OF_SPEC ? 'lot result' : statisticWords(r.chart_type, r.chart),
      text: formatQuantity(r.statistic, r.decimals, r.unit),
    },
    limit: r.limit_name && r.limit_value !== null ? { name: limitWords[r.limit_name] ?? 'limit', text: formatQuantity(r.limit_value, r.decimals, r.unit) } : null,
    ruleDescription: r.rule === OUT_OF_SPEC ? 'The lot’s result lies outside the specification in force when it was produced.' : (ruleDescriptions[r.rule as RuleId] ?? null),
    chart: r.chart,
    ...signalOfRow(r),
    late: r.late,
    source: r.source,
    runId: r.run_id,
    status: r.status,
    resolution: r.resolution,
    createdAt: isoOf(r.created_at),
    detectedAt: isoOf(r.detected_at),
    updatedAt: isoOf(r.updated_at),
    acknowledgedAt: iso(r.acknowledged_at),
    acknowledgedBy: r.acknowledged_by,
    acknowledgeNote: r.acknowledge_note,
    closedAt: iso(r.closed_at),
    closedBy: r.closed_by,
    closeNote: r.close_note,
    chartUrl: chartLink(publicUrl, r.characteristic_id, r.lot_number),
  };
}

const select = sql`
  select a.id, a.characteristic_id, c.code as characteristic_code, c.name as characteristic_name, c.unit, tm.decimals, c.chart_type, p.code as product_code, pl.code as line_code,
    a.lot_id, l.lot_number, l.produced_at, a.rule, a.chart, a.point_index, a.statistic, a."values", a.limit_name, a.limit_value, a.description, a.late, a.late_reason,
    a.source, a.run_id, a.status, a.resolution, a.created_at, a.detected_at, a.updated_at, a.acknowledged_at, ua.name as acknowledged_by, a.acknowledge_note,
    a.closed_at, uc.name as closed_by, a.close_note
  ${alarmsInContext}
  left join users ua on ua.id = a.acknowledged_by
  left join users uc on uc.id = a.closed_by`;

/**
 * What matters this morning: the lots with a signal outside the specification first, then those
 * beyond a control limit, then the patterns; newest lot first within each; the signals of one lot on
 * one characteristic together, the most severe first. The alarms page states the same rule.
 */
const rank = sql`(case a.rule when 'out-of-spec' then 0 when 'we1' then 1 else 2 end)`;
const WHAT_MATTERS = sql`min(${rank}) over (partition by a.characteristic_id, a.lot_id), l.produced_at desc, l.lot_number, c.code, ${rank}, a.id`;

/** Alarms: every role reads them; quality managers and admins acknowledge and close them with a note. */
export function alarmsRouter(db: Database, publicUrl: string): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', async (req, res) => {
    const q = parseBody(listAlarmsQuerySchema, req.query);
    const like = q.q ? `%${q.q.replace(/[%_\\]/g, '\\$&')}%` : null;
    const res2 = await db.execute<AlarmRow>(sql`${select}
      where (${q.status ?? null}::alarm_status is null or a.status = ${q.status ?? null}::alarm_status)
        and (${q.characteristicId ?? null}::int is null or a.characteristic_id = ${q.characteristicId ?? null}::int)
        and (${like}::text is null or l.lot_number ilike ${like} or c.code ilike ${like})
      order by ${WHAT_MATTERS} limit ${q.limit}`);
    const counts = await db.execute<{ status: AlarmStatus; n: number }>(sql`select status, count(*)::int as n from alarms group by status`);
    res.json({ items: res2.rows.map((r) => toView(r, publicUrl)), counts: Object.fromEntries(counts.rows.map((c) => [c.status, c.n])) } satisfies AlarmList);
  });

  router.get('/:id', async (req, res) => {
    const { id } = parseBody(alarmIdParamsSchema, req.params);
    const r = await db.execute<AlarmRow>(sql`${select} where a.id = ${id}`);
    if (!r.rows[0]) throw notFound(`Alarm ${id}`);
    res.json(toView(r.rows[0], publicUrl));
  });

  const change = (action: 'acknowledge' | 'close') =>
    async (req: Parameters<Parameters<Router['post']>[1]>[0], res: Parameters<Parameters<Router['post']>[1]>[1]) => {
      const { id } = parseBody(alarmIdParamsSchema, req.params);
      const { note } = parseBody(alarmNoteSchema, req.body);
      await triageAlarm(db, { id, action, note, userId: req.user!.id });
      const r = await db.execute<AlarmRow>(sql`${select} where a.id = ${id}`);
      res.json(toView(r.rows[0], publicUrl));
    };

  router.post('/:id/acknowledge', requirePermission('alarm.acknowledge'), change('acknowledge'));
  router.post('/:id/close', requirePermission('alarm.close'), change('close'));
  return router;
}
