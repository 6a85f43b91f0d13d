// Alarms: what a chart shows that someone must look at. One row per characteristic, rule, chart and
// lot (the dedupe key), so a re-run finds the row it raised before instead of raising it again.
import { sql } from 'drizzle-orm';
import { alarmSentence, brokenLimit, isOutOfSpec, lotResult, specAt, specVerdict } from '@shared/spc';
import { alarmStatusWords, alarmSteps, type AlarmOutcome, type AlarmSignal, type AlarmResolution, type AlarmStatus, type CauseCategory } from '@shared/schemas/alarms';
import { recordAudit } from '../db/audit';
import { holdOutOfSpecLots } from '../lots/holds';
import type { Database } from '../db/client';
import { conflict, fieldError, notFound } from '../http/errors';
import { queueAssignedMail, queueReopenedMail } from '../mail/alarm-triage-mail';
import type { CharacteristicChart, ChartInputs } from './chart-assembly';
import { excludePoint } from './chart-commands';
import { arr, type Executor, type Tx } from './db';

/** The columns of an alarm row that hold its signal, as raw SQL reads them (alarm list, alarm e-mail). */
export type AlarmSignalColumns = {
  point_index: number;
  statistic: number;
  values: number[];
  limit_name: string | null;
  limit_value: number | null;
  description: string;
  late_reason: string | null;
};

/** An alarm with what it concerns: characteristic c, its test method tm, product p, line pl and lot l. */
export const alarmsInContext = sql`
  from alarms a
  join characteristics c on c.id = a.characteristic_id
  join test_methods tm on tm.id = c.test_method_id
  join products p on p.id = c.product_id
  left join production_lines pl on pl.id = p.line_id
  join lots l on l.id = a.lot_id`;

/** The signal's facts of an alarm row, in the answer's and the e-mail's names. */
export const signalOfRow = (r: AlarmSignalColumns) => ({
  pointIndex: r.point_index,
  statistic: r.statistic,
  values: r.values.map(Number),
  limitName: r.limit_name,
  limitValue: r.limit_value,
  description: r.description,
  lateReason: r.late_reason,
});

export const OUT_OF_SPEC = 'out-of-spec';
/** A falling-capability alarm: raised and kept by capability-alarm.ts once per crossing, never by the findings of a chart. */
export const CAPABILITY = 'capability';

export const DATA_CHANGED_NOTE = 'The data no longer show this signal: a result was voided or corrected, a point was excluded, or the limits changed.';

/** A signal on the chart that should be an alarm now, at this lot. */
export interface Finding extends AlarmSignal {
  lotId: number;
}

export const lateResultText = (lot: string) =>
  `Late result: lot ${lot} was tested after later lots were charted, so this signal sits at the lot's earlier position on the chart, not at its end.`;
export const EARLIER_POSITION_TEXT = 'This signal sits at an earlier position of the chart: the limits were recalculated or earlier data changed.';

export interface PreviousSnapshot {
  /** Production time of the newest lot charted last time. */
  periodTo: Date | null;
  computedAt: Date;
}

/** Everything on the chart that should be an alarm now. */
export function findingsOf(chart: CharacteristicChart, inputs: ChartInputs, previous: PreviousSnapshot | null): Finding[] {
  const c = chart.characteristic;
  const words = { chartType: c.chartType, unit: c.unit, decimals: c.decimals };
  const out: Finding[] = [];
  const lateReason = (i: number): string | null => {
    const p = chart.points[i];
    if (!previous?.periodTo || new Date(p.producedAt).getTime() >= previous.periodTo.getTime()) return null;
    return inputs.lots[i].lastEnteredAt.getTime() > previous.computedAt.getTime() ? lateResultText(p.lotNumber) : EARLIER_POSITION_TEXT;
  };

  // A pattern rule fires again at every point that prolongs the pattern; one alarm per episode, at
  // the point that first completed it. A violation prolongs the episode when its pattern reaches
  // back to the previous violation of the same rule: "two of three" fires again two points later,
  // and a run goes on across an excluded point, which the rules skip. Each point beyond a control
  // limit is an alarm of its own.
  const lastAt = new Map<string, number>();
  for (const v of chart.violations) {
    if (v.rule !== 'we1') {
      const key = `${v.rule}|${v.chart}`;
      const previous = lastAt.get(key);
      lastAt.set(key, v.index);
      if (previous !== undefined && v.points[0] <= previous) continue;
    }
    const p = chart.points[v.index];
    const isLocation = v.chart === 'location';
    const statistic = isLocation ? p.location : p.dispersion!;
    let limitName: string | null = null;
    let limitValue: number | null = null;
    if (v.rule === 'we1') {
      // The limit of the chart the point is plotted on: a range is compared with the range chart's limits.
      const ucl = isLocation ? p.ucl : p.dispersionUcl;
      const lcl = isLocation ? p.lcl : p.dispersionLcl;
      const above = ucl !== null && statistic > ucl;
      limitName = above ? 'UCL' : 'LCL';
      limitValue = above ? ucl : lcl;
    }
    out.push({
      lotId: p.lotId,
      rule: v.rule,
      chart: v.chart,
      pointIndex: v.index,
      statistic,
      values: p.values,
      limitName,
      limitValue,
      description: alarmSentence({ ...words, rule: v.rule, chart: v.chart, statistic, values: p.values, limitName, limitValue }),
      lateReason: lateReason(v.index),
    });
  }

  chart.points.forEach((p, i) => {
    if (!p.outOfSpec) return;
    const spec = specAt(inputs.specs, new Date(p.producedAt))!;
    const result = lotResult(p.values);
    const verdict = specVerdict(result, spec);
    if (!isOutOfSpec(verdict)) return;
    const limit = brokenLimit(verdict, spec);
    out.push({
      lotId: p.lotId,
      rule: OUT_OF_SPEC,
      chart: 'location',
      pointIndex: i,
      statistic: result,
      values: p.values,
      limitName: limit.name,
      limitValue: limit.value,
      description: outOfSpecText({ result, values: p.values, limitName: limit.name, limitValue: limit.value, revision: spec.revision, unit: c.unit, decimals: c.decimals }),
      lateReason: lateReason(i),
    });
  });
  return out;
}

/** The sentence of an out-of-specification alarm, the same whether the import or the run raised it. */
export function outOfSpecText(o: { result: number; values: number[]; limitName: string; limitValue: number; revision: number; unit: string; decimals: number }): string {
  return alarmSentence({
    rule: OUT_OF_SPEC,
    chart: 'location',
    chartType: 'xbar-r',
    statistic: o.result,
    values: o.values,
    limitName: o.limitName,
    limitValue: o.limitValue,
    unit: o.unit,
    decimals: o.decimals,
    specRevision: o.revision,
  });
}

type ExistingAlarm = {
  id: number;
  rule: string;
  chart: string;
  lot_id: number;
  status: AlarmStatus;
  resolution: AlarmResolution | null;
  point_index: number;
  statistic: number;
  description: string;
};

const keyOf = (characteristicId: number, rule: string, chart: string, lotId: number) => `${characteristicId}|${rule}|${chart}|${lotId}`;

export interface ReconcileOutcome {
  raised: number[];
  reopened: number[];
  resolved: number[];
}

/**
 * Brings the characteristic's alarms in line with its findings: new findings raise alarms, alarms
 * whose finding is gone are closed as resolved by a data change, moved points are updated.
 * Nothing is written for an alarm that did not change. E-mail follows when the whole run is done
 * (queueRunMail), so that a lot's signals on several characteristics make one message.
 */
export async function reconcileAlarms(
  tx: Executor,
  opts: { characteristicId: number; findings: Finding[]; runId: number | null },
): Promise<ReconcileOutcome> {
  const existing = await tx.execute<ExistingAlarm>(sql`
    select id, rule, chart, lot_id, status, resolution, point_index, statistic, description from alarms
    where characteristic_id = ${opts.characteristicId} and rule <> ${CAPABILITY}`);
  const byKey = new Map(existing.rows.map((a) => [keyOf(opts.characteristicId, a.rule, a.chart, a.lot_id), a]));
  const wanted = new Set<string>();
  const toInsert: Finding[] = [];
  const toReopen: { id: number; f: Finding }[] = [];
  const toUpdate: { id: number; f: Finding }[] = [];
  for (const f of opts.findings) {
    const key = keyOf(opts.characteristicId, f.rule, f.chart, f.lotId);
    wanted.add(key);
    const a = byKey.get(key);
    if (!a) toInsert.push(f);
    else if (a.status === 'closed' && a.resolution === 'data-changed') toReopen.push({ id: a.id, f });
    else if (a.status !== 'closed' && (a.point_index !== f.pointIndex || a.statistic !== f.statistic || a.description !== f.description)) toUpdate.push({ id: a.id, f });
  }
  const gone = existing.rows.filter((a) => a.status !== 'closed' && !wanted.has(keyOf(opts.characteristicId, a.rule, a.chart, a.lot_id)));
  const toResolve = gone.map((a) => a.id);

  let raised: number[] = [];
  if (toInsert.length) {
    const res = await tx.execute<{ id: number; rule: string }>(sql`
      insert into alarms (characteristic_id, lot_id, rule, chart, point_index, statistic, "values", limit_name, limit_value, description, late, late_reason, source, run_id)
      select ${opts.characteristicId}, u.lot_id, u.rule, u.chart, u.point_index, u.statistic, array(select json_array_elements_text(u.vals)::float8), u.limit_name, u.limit_value,
             u.description, u.late_reason is not null, u.late_reason, 'run', ${opts.runId}::int
      from unnest(${arr(toInsert.map((f) => f.lotId))}::int[], ${arr(toInsert.map((f) => f.rule))}::text[], ${arr(toInsert.map((f) => f.chart))}::text[],
                  ${arr(toInsert.map((f) => f.pointIndex))}::int[], ${arr(toInsert.map((f) => f.statistic))}::float8[], ${arr(toInsert.map((f) => JSON.stringify(f.values)))}::json[],
                  ${arr(toInsert.map((f) => f.limitName))}::text[], ${arr(toInsert.map((f) => f.limitValue))}::float8[], ${arr(toInsert.map((f) => f.description))}::text[],
                  ${arr(toInsert.map((f) => f.lateReason))}::text[])
           as u(lot_id, rule, chart, point_index, statistic, vals, limit_name, limit_value, description, late_reason)
      on conflict (characteristic_id, rule, chart, lot_id) do nothing
      returning id, rule`);
    raised = res.rows.map((r) => r.id);
  }
  for (const { id, f } of toReopen) {
    await tx.execute(sql`
      update alarms set status = 'open', resolution = null, closed_at = null, closed_by = null, close_note = null, point_index = ${f.pointIndex},
        statistic = ${f.statistic}, "values" = ${arr(f.values)}::float8[], limit_name = ${f.limitName}, limit_value = ${f.limitValue},
        description = ${f.description}, late = ${f.lateReason !== null}, late_reason = ${f.lateReason}, run_id = ${opts.runId}::int, detected_at = now(), updated_at = now()
      where id = ${id}`);
  }
  for (const { id, f } of toUpdate) {
    await tx.execute(sql`
      update alarms set point_index = ${f.pointIndex}, statistic = ${f.statistic}, "values" = ${arr(f.values)}::float8[], limit_name = ${f.limitName},
        limit_value = ${f.limitValue}, description = ${f.description}, updated_at = now()
      where id = ${id}`);
  }
  // A lot out of specification goes on hold with the alarm that says so (api/lots/holds.ts).
  await holdOutOfSpecLots(tx, [...raised, ...toReopen.filter((r) => r.f.rule === OUT_OF_SPEC).map((r) => r.id)]);
  if (toResolve.length) {
    await tx.execute(sql`
      update alarms set status = 'closed', resolution = 'data-changed', closed_at = now(), close_note = ${DATA_CHANGED_NOTE}, updated_at = now()
      where id = any(${arr(toResolve)}::int[])`);
    await recordAudit(
      tx,
      gone.map((a) => ({ actorId: null, action: 'close-automatically', entity: 'alarm', entityId: a.id, before: { status: a.status }, after: { status: 'closed', resolution: 'data-changed' }, reason: DATA_CHANGED_NOTE })),
    );
  }
  return { raised, reopened: toReopen.map((r) => r.id), resolved: toResolve };
}


export interface AlarmChange {
  id: number;
  userId: number;
  /** The next status: one of alarmSteps of the current one. */
  status?: AlarmStatus;
  outcome?: AlarmOutcome;
  causeCategory?: CauseCategory;
  note?: string;
  /** Closing with an assignable cause: leave the alarm's point out of the limit estimate. */
  excludePoints?: boolean;
  /** null: nobody. */
  assigneeId?: number | null;
  groupId?: number | null;
}

export interface AlarmChangeOutcome {
  /** Characteristics whose exclusions changed: the caller starts their run after commit (ResultsChanged). */
  excludedOn: number[];
}

type TriageRow = {
  status: AlarmStatus;
  resolution: AlarmResolution | null;
  characteristic_id: number;
  lot_id: number;
  assignee_id: number | null;
  group_id: number | null;
  outcome: string | null;
};

const MIN_NOTE = 3;
const needsNote = (note: string | undefined, message: string) => {
  if (!note || note.length < MIN_NOTE) throw fieldError('note', message);
  return note;
};

/**
 * A person's decision on one alarm, in the caller's transaction with its audit events and e-mails: a
 * step of the status flow (alarmSteps; closing needs an outcome, an assignable cause its category,
 * reopening a reason), the assignee, the investigation it belongs to. Refused steps answer 409 naming
 * the allowed ones.
 */
export async function changeAlarm(tx: Tx, c: AlarmChange, publicUrl: string): Promise<AlarmChangeOutcome> {
  const cur = await tx.execute<TriageRow>(sql`
    select status, resolution, characteristic_id, lot_id, assignee_id, group_id, outcome from alarms where id = ${c.id} for update`);
  const a = cur.rows[0];
  if (!a) throw notFound(`Alarm ${c.id}`);
  const excludedOn: number[] = [];
  if (c.status === undefined && (c.outcome || c.causeCategory || c.excludePoints)) throw fieldError('status', 'An outcome is given when closing: set status to closed');

  if (c.status !== undefined) {
    const allowed = alarmSteps[a.status];
    if (!allowed.includes(c.status)) {
      const next = allowed.map((s) => alarmStatusWords[s].toLowerCase()).join(' or ');
      throw conflict(`Alarm ${c.id} is ${alarmStatusWords[a.status].toLowerCase()}: it can go to ${next} only`, [{ path: 'status', message: `Allowed next: ${allowed.join(', ')}` }]);
    }
    if (c.status !== 'closed' && (c.outcome || c.causeCategory || c.excludePoints)) throw fieldError('outcome', 'An outcome is given only when closing');
    const before = { status: a.status };
    if (c.status === 'acknowledged') {
      await tx.execute(sql`update alarms set status = 'acknowledged', acknowledged_at = now(), acknowledged_by = ${c.userId}, acknowledge_note = ${c.note ?? null}, updated_at = now() where id = ${c.id}`);
      await recordAudit(tx, { actorId: c.userId, action: 'acknowledge', entity: 'alarm', entityId: c.id, before, after: { status: c.status }, reason: c.note ?? null });
    } else if (c.status === 'investigating') {
      await tx.execute(sql`update alarms set status = 'investigating', investigating_at = now(), investigating_by = ${c.userId}, updated_at = now() where id = ${c.id}`);
      await recordAudit(tx, { actorId: c.userId, action: 'investigate', entity: 'alarm', entityId: c.id, before, after: { status: c.status }, reason: c.note ?? null });
    } else if (c.status === 'closed') {
      if (!c.outcome) throw fieldError('outcome', 'Say what was found: an assignable cause, no cause, or a false alarm');
      if (c.outcome === 'assignable-cause' && !c.causeCategory) throw fieldError('causeCategory', 'Choose the category of the assignable cause');
      if (c.outcome !== 'assignable-cause' && c.causeCategory) throw fieldError('causeCategory', 'A cause category goes with an assignable cause only');
      if (c.excludePoints && c.outcome !== 'assignable-cause') throw fieldError('excludePoints', 'Only a point with an assignable cause is left out of the limits');
      const note = needsNote(c.note, 'Write what was checked and found, at least 3 characters');
      await tx.execute(sql`
        update alarms set status = 'closed', resolution = 'by-user', outcome = ${c.outcome}, cause_category = ${c.causeCategory ?? null},
          closed_at = now(), closed_by = ${c.userId}, close_note = ${note}, updated_at = now()
        where id = ${c.id}`);
      await recordAudit(tx, {
        actorId: c.userId, action: 'close', entity: 'alarm', entityId: c.id, before,
        after: { status: 'closed', outcome: c.outcome, causeCategory: c.causeCategory ?? null, excludePoints: c.excludePoints ?? false }, reason: note,
      });
      if (c.excludePoints) {
        const already = await tx.execute(sql`select 1 from point_exclusions where characteristic_id = ${a.characteristic_id} and lot_id = ${a.lot_id} and removed_at is null`);
        // The one exclusion path, with the closing note as its reason; a point excluded already stays so.
        if (!already.rows.length) await excludePoint(tx, { characteristicId: a.characteristic_id, lotId: a.lot_id, reason: note, userId: c.userId });
        excludedOn.push(a.characteristic_id);
      }
    } else {
      if (a.resolution === 'data-changed') throw conflict(`Alarm ${c.id} was closed because the data no longer show the signal; a new run raises it again if they do`);
      const reason = needsNote(c.note, 'Say why the alarm opens again, at least 3 characters');
      await tx.execute(sql`
        update alarms set status = 'open', resolution = null, outcome = null, cause_category = null, closed_at = null, closed_by = null, close_note = null,
          acknowledged_at = null, acknowledged_by = null, acknowledge_note = null, investigating_at = null, investigating_by = null,
          reopened_at = now(), reopened_by = ${c.userId}, reopen_reason = ${reason}, updated_at = now()
        where id = ${c.id}`);
      await recordAudit(tx, { actorId: c.userId, action: 'reopen', entity: 'alarm', entityId: c.id, before: { status: a.status, outcome: a.outcome }, after: { status: 'open' }, reason });
      await queueReopenedMail(tx, { alarmId: c.id, byUserId: c.userId, reason, publicUrl });
    }
  }

  if (c.assigneeId !== undefined && c.assigneeId !== a.assignee_id) {
    if (c.assigneeId !== null) {
      const who = await tx.execute(sql`select 1 from users where id = ${c.assigneeId} and active`);
      if (!who.rows.length) throw fieldError('assigneeId', 'Choose an active user from the list');
    }
    await tx.execute(sql`update alarms set assignee_id = ${c.assigneeId}, updated_at = now() where id = ${c.id}`);
    await recordAudit(tx, { actorId: c.userId, action: 'assign', entity: 'alarm', entityId: c.id, before: { assigneeId: a.assignee_id }, after: { assigneeId: c.assigneeId }, reason: c.note ?? null });
    // The new assignee is told, unless they took the alarm themselves.
    if (c.assigneeId !== null && c.assigneeId !== c.userId) await queueAssignedMail(tx, { alarmId: c.id, assigneeId: c.assigneeId, byUserId: c.userId, note: c.note ?? null, publicUrl });
  }

  if (c.groupId !== undefined && c.groupId !== a.group_id) {
    if (c.groupId !== null) {
      const group = await tx.execute(sql`select 1 from alarm_groups where id = ${c.groupId}`);
      if (!group.rows.length) throw fieldError('groupId', `Investigation ${c.groupId} not found`);
    }
    await tx.execute(sql`update alarms set group_id = ${c.groupId}, updated_at = now() where id = ${c.id}`);
    await recordAudit(tx, { actorId: c.userId, action: 'group', entity: 'alarm', entityId: c.id, before: { groupId: a.group_id }, after: { groupId: c.groupId }, reason: c.note ?? null });
  }
  return { excludedOn };
}

/** Acknowledges every open alarm of `ids` (at most 500, bounded by the request schema); the others are named as skipped. */
export async function acknowledgeAlarms(tx: Tx, o: { ids: number[]; userId: number; note: string | null }): Promise<{ acknowledged: number[]; skipped: number[] }> {
  const done = await tx.execute<{ id: number }>(sql`
    update alarms set status = 'acknowledged', acknowledged_at = now(), acknowledged_by = ${o.userId}, acknowledge_note = ${o.note}, updated_at = now()
    where id = any(${arr(o.ids)}::int[]) and status = 'open'
    returning id`);
  const acknowledged = done.rows.map((r) => r.id).sort((x, y) => x - y);
  await recordAudit(
    tx,
    acknowledged.map((id) => ({ actorId: o.userId, action: 'acknowledge' as const, entity: 'alarm' as const, entityId: id, before: { status: 'open' }, after: { status: 'acknowledged' }, reason: o.note })),
  );
  const set = new Set(acknowledged);
  return { acknowledged, skipped: [...new Set(o.ids)].filter((id) => !set.has(id)) };
}

/** A comment on an alarm, with its audit event. */
export async function commentOnAlarm(tx: Tx, o: { alarmId: number; userId: number; body: string }): Promise<number> {
  const found = await tx.execute(sql`select 1 from alarms where id = ${o.alarmId}`);
  if (!found.rows.length) throw notFound(`Alarm ${o.alarmId}`);
  const res = await tx.execute<{ id: number }>(sql`insert into alarm_comments (alarm_id, author_id, body) values (${o.alarmId}, ${o.userId}, ${o.body}) returning id`);
  await recordAudit(tx, { actorId: o.userId, action: 'comment', entity: 'alarm', entityId: o.alarmId, after: { commentId: res.rows[0].id }, reason: o.body });
  return res.rows[0].id;
}

/** One investigation of several alarms: the group and each alarm's move into it, audited. */
export async function groupAlarms(tx: Tx, o: { title: string; note: string | null; alarmIds: number[]; userId: number }): Promise<number> {
  const ids = [...new Set(o.alarmIds)];
  const found = await tx.execute<{ id: number; group_id: number | null }>(sql`select id, group_id from alarms where id = any(${arr(ids)}::int[]) for update`);
  const missing = ids.filter((id) => !found.rows.some((r) => r.id === id));
  if (missing.length) throw fieldError('alarmIds', `No alarm ${missing.slice(0, 10).join(', ')}`);
  const g = await tx.execute<{ id: number }>(sql`insert into alarm_groups (title, note, created_by) values (${o.title}, ${o.note}, ${o.userId}) returning id`);
  const groupId = g.rows[0].id;
  await tx.execute(sql`update alarms set group_id = ${groupId}, updated_at = now() where id = any(${arr(ids)}::int[])`);
  await recordAudit(tx, [
    { actorId: o.userId, action: 'create', entity: 'alarm group', entityId: groupId, after: { title: o.title, alarmIds: ids }, reason: o.note },
    ...found.rows.map((r) => ({ actorId: o.userId, action: 'group' as const, entity: 'alarm' as const, entityId: r.id, before: { groupId: r.group_id }, after: { groupId }, reason: o.title })),
  ]);
  return groupId;
}

export interface TriageRequest {
  id: number;
  action: 'acknowledge' | 'close';
  /** What was checked or decided, for the record. */
  note: string;
  userId: number;
}

/**
 * Acknowledges or closes an alarm with a note in a transaction of its own (the demo's recorded
 * decisions); a close without an outcome keeps the outcome empty, as decisions before outcomes were.
 */
export async function triageAlarm(db: Database, req: TriageRequest): Promise<void> {
  await db.transaction(async (tx) => {
    if (req.action === 'acknowledge') {
      await changeAlarm(tx, { id: req.id, userId: req.userId, status: 'acknowledged', note: req.note }, '');
      return;
    }
    const cur = await tx.execute<{ status: AlarmStatus }>(sql`select status from alarms where id = ${req.id} for update`);
    if (!cur.rows[0]) throw notFound(`Alarm ${req.id}`);
    if (cur.rows[0].status === 'closed') throw conflict(`Alarm ${req.id} is already closed`);
    await tx.execute(sql`update alarms set status = 'closed', resolution = 'by-user', closed_at = now(), closed_by = ${req.userId}, close_note = ${req.note}, updated_at = now() where id = ${req.id}`);
    await recordAudit(tx, { actorId: req.userId, action: 'close', entity: 'alarm', entityId: req.id, before: { status: cur.rows[0].status }, after: { status: 'closed' }, reason: req.note });
  });
}
