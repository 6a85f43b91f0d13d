import { Router } from 'express';
import { sql } from 'drizzle-orm';
import { limitWords, ruleDescriptions, signalName, statisticWords, type ChartType, type RuleId } from '@shared/spc';
import { formatFigure, formatQuantity } from '@shared/figures';
import {
  alarmSteps,
  type AlarmChart,
  type AlarmDetail,
  type AlarmList,
  type AlarmOutcome,
  type AlarmResolution,
  type AlarmRule,
  type AlarmSource,
  type AlarmStatus,
  type AlarmView,
  type BulkAcknowledgeResult,
  type CauseCategory,
} from '@shared/schemas/alarms';
import type { LotStatus } from '@shared/schemas/lots';
import type { Database } from '@api/db/client';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { chartLink } from '@api/mail/compose';
import { lotStatusSql } from '@api/lots/holds';
import type { ResultsChanged } from '@api/spc/results-changed';
import { acknowledgeAlarms, alarmsInContext, CAPABILITY, changeAlarm, commentOnAlarm, OUT_OF_SPEC, signalOfRow, type AlarmSignalColumns } from '@api/spc/alarms';
import { groupOf } from '@api/routes/alarm-groups/router';
import { alarmCommentSchema, alarmIdParamsSchema, alarmPatchSchema, bulkAcknowledgeSchema, listAlarmsQuerySchema } from './schema';

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
  outcome: AlarmOutcome | null;
  cause_category: CauseCategory | null;
  investigating_at: Date | null;
  investigating_by: string | null;
  reopened_at: Date | null;
  reopened_by: string | null;
  reopen_reason: string | null;
  assignee_id: number | null;
  assignee_name: string | null;
  group_id: number | null;
  group_title: string | null;
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
      name: r.rule === OUT_OF_SPEC ? 'lot result' : r.rule === CAPABILITY ? 'capability index' : statisticWords(r.chart_type, r.chart),
      text: r.rule === CAPABILITY ? formatFigure(r.statistic, 2) : formatQuantity(r.statistic, r.decimals, r.unit),
    },
    limit:
      r.limit_name && r.limit_value !== null
        ? r.rule === CAPABILITY
          ? { name: 'capability threshold', text: formatFigure(r.limit_value, 2) }
          : { name: limitWords[r.limit_name] ?? 'limit', text: formatQuantity(r.limit_value, r.decimals, r.unit) }
        : null,
    ruleDescription:
      r.rule === OUT_OF_SPEC
        ? 'The lot’s result lies outside the specification in force when it was produced.'
        : r.rule === CAPABILITY
          ? 'The capability index over the newest lots fell below the characteristic’s threshold.'
          : (ruleDescriptions[r.rule as RuleId] ?? null),
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
    outcome: r.outcome,
    causeCategory: r.cause_category,
    investigatingAt: iso(r.investigating_at),
    investigatingBy: r.investigating_by,
    reopenedAt: iso(r.reopened_at),
    reopenedBy: r.reopened_by,
    reopenReason: r.reopen_reason,
    assignee: r.assignee_id !== null ? { id: r.assignee_id, name: r.assignee_name ?? '' } : null,
    group: r.group_id !== null ? { id: r.group_id, title: r.group_title ?? '' } : null,
    chartUrl: chartLink(publicUrl, r.characteristic_id, r.lot_number),
  };
}

const select = sql`
  select a.id, a.characteristic_id, c.code as characteristic_code, c.name as characteristic_name, c.unit, tm.decimals, c.chart_type, p.code as product_code, pl.code as line_code,
    a.lot_id, l.lot_number, l.produced_at, a.rule, a.chart, a.point_index, a.statistic, a."values", a.limit_name, a.limit_value, a.description, a.late, a.late_reason,
    a.source, a.run_id, a.status, a.resolution, a.created_at, a.detected_at, a.updated_at, a.acknowledged_at, ua.name as acknowledged_by, a.acknowledge_note,
    a.closed_at, uc.name as closed_by, a.close_note, a.outcome, a.cause_category, a.investigating_at, ui.name as investigating_by,
    a.reopened_at, ur.name as reopened_by, a.reopen_reason, a.assignee_id, us.name as assignee_name, a.group_id, g.title as group_title
  ${alarmsInContext}
  left join users ua on ua.id = a.acknowledged_by
  left join users uc on uc.id = a.closed_by
  left join users ui on ui.id = a.investigating_by
  left join users ur on ur.id = a.reopened_by
  left join users us on us.id = a.assignee_id
  left join alarm_groups g on g.id = a.group_id`;

/**
 * What matters this morning: the lots with a signal outside the specification first, then those
 * beyond a control limit, then the patterns; newest lot first within each; the signals of one lot on
 * one characteristic together, the most severe first. The alarms page states the same rule.
 */
const rank = sql`(case a.rule when 'out-of-spec' then 0 when 'we1' then 1 else 2 end)`;
const WHAT_MATTERS = sql`min(${rank}) over (partition by a.characteristic_id, a.lot_id), l.produced_at desc, l.lot_number, c.code, ${rank}, a.id`;

/** Alarms: every role reads them; quality managers and admins triage them (alarm.triage). */
export function alarmsRouter(db: Database, publicUrl: string, resultsChanged: ResultsChanged): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', requirePermission('alarm.read'), async (req, res) => {
    const q = parseBody(listAlarmsQuerySchema, req.query);
    const like = q.q ? `%${q.q.replace(/[%_\\]/g, '\\$&')}%` : null;
    const assignee = q.assignee === 'me' ? req.user!.id : q.assignee === 'nobody' ? null : (q.assignee ?? null);
    // Every filter but the status: the counts per status are those of the same filter.
    const filter = sql`(${q.characteristicId ?? null}::int is null or a.characteristic_id = ${q.characteristicId ?? null}::int)
        and (${q.productId ?? null}::int is null or c.product_id = ${q.productId ?? null}::int)
        and (${q.lineId ?? null}::int is null or p.line_id = ${q.lineId ?? null}::int)
        and (${q.rule ?? null}::text is null or a.rule = ${q.rule ?? null}::text)
        and (${q.assignee === undefined} or (${q.assignee === 'nobody'} and a.assignee_id is null) or a.assignee_id = ${assignee}::int)
        and (${q.olderThanDays ?? null}::int is null or a.detected_at <= now() - make_interval(days => ${q.olderThanDays ?? 0}))
        and (${q.newerThanDays ?? null}::int is null or a.detected_at >= now() - make_interval(days => ${q.newerThanDays ?? 0}))
        and (${like}::text is null or l.lot_number ilike ${like} or c.code ilike ${like})`;
    const order = q.sort === 'newest' ? sql`a.detected_at desc, a.id desc` : q.sort === 'oldest' ? sql`a.detected_at, a.id` : WHAT_MATTERS;
    const res2 = await db.execute<AlarmRow>(sql`${select}
      where (${q.status ?? null}::alarm_status is null or a.status = ${q.status ?? null}::alarm_status) and ${filter}
      order by ${order} limit ${q.limit}`);
    const counts = await db.execute<{ status: AlarmStatus; n: number }>(sql`select a.status, count(*)::int as n ${alarmsInContext} where ${filter} group by a.status`);
    res.json({ items: res2.rows.map((r) => toView(r, publicUrl)), counts: Object.fromEntries(counts.rows.map((c) => [c.status, c.n])) } satisfies AlarmList);
  });

  router.get('/:id', requirePermission('alarm.read'), async (req, res) => {
    const { id } = parseBody(alarmIdParamsSchema, req.params);
    res.json(await detailOf(db, id, publicUrl));
  });

  router.patch('/:id', requirePermission('alarm.triage'), async (req, res) => {
    const { id } = parseBody(alarmIdParamsSchema, req.params);
    const body = parseBody(alarmPatchSchema, req.body);
    const done = await db.transaction((tx) => changeAlarm(tx, { id, userId: req.user!.id, ...body }, publicUrl));
    // As the exclusions route does: the run follows the committed exclusion.
    if (done.excludedOn.length) await resultsChanged({ characteristicIds: done.excludedOn, because: 'limits', by: req.user!.id });
    res.json(await detailOf(db, id, publicUrl));
  });

  router.post('/:id/comments', requirePermission('alarm.triage'), async (req, res) => {
    const { id } = parseBody(alarmIdParamsSchema, req.params);
    const { body } = parseBody(alarmCommentSchema, req.body);
    await db.transaction((tx) => commentOnAlarm(tx, { alarmId: id, userId: req.user!.id, body }));
    res.status(201).json(await detailOf(db, id, publicUrl));
  });

  router.post('/acknowledge', requirePermission('alarm.triage'), async (req, res) => {
    const { ids, note } = parseBody(bulkAcknowledgeSchema, req.body);
    const done = await db.transaction((tx) => acknowledgeAlarms(tx, { ids, userId: req.user!.id, note: note ?? null }));
    res.json(done satisfies BulkAcknowledgeResult);
  });
  return router;
}

/** The alarm with its comments, investigation, history (its audit events), linked NCRs and the lot's status now. */
async function detailOf(db: Database, id: number, publicUrl: string): Promise<AlarmDetail> {
  const r = await db.execute<AlarmRow>(sql`${select} where a.id = ${id}`);
  if (!r.rows[0]) throw notFound(`Alarm ${id}`);
  const view = toView(r.rows[0], publicUrl);
  const [lot, comments, history, ncrs, group] = await Promise.all([
    db.execute<{ status: LotStatus }>(sql`select ${lotStatusSql(sql`${r.rows[0].lot_id}::int`)} as status`),
    db.execute<{ id: number; author: string; body: string; created_at: Date }>(sql`
      select k.id, u.name as author, k.body, k.created_at from alarm_comments k join users u on u.id = k.author_id where k.alarm_id = ${id} order by k.created_at, k.id limit 500`),
    db.execute<{ at: Date; actor: string | null; action: string; reason: string | null; before: unknown; after: unknown }>(sql`
      select e.at, u.name as actor, e.action, e.reason, e.before, e.after from audit_events e left join users u on u.id = e.actor_id
      where e.entity = 'alarm' and e.entity_id = ${String(id)} order by e.id limit 500`),
    db.execute<{ id: number; number: string; status: string }>(sql`
      select n.id, n.number, n.status from ncr_alarms na join ncrs n on n.id = na.ncr_id where na.alarm_id = ${id} order by n.id limit 100`),
    view.group ? groupOf(db, view.group.id) : Promise.resolve(null),
  ]);
  return {
    ...view,
    comments: comments.rows.map((k) => ({ id: k.id, author: k.author, body: k.body, createdAt: isoOf(k.created_at) })),
    group,
    history: history.rows.map((h) => ({ at: isoOf(h.at), actor: h.actor, action: h.action, reason: h.reason, before: h.before, after: h.after })),
    ncrs: ncrs.rows,
    lotStatus: lot.rows[0].status,
    nextSteps: alarmSteps[view.status],
  };
}
