// Alarms: what a chart shows that someone must look at. One row per characteristic, rule, chart and
// lot (the dedupe key), so a re-run finds the row it raised before instead of raising it again.
import { sql } from 'drizzle-orm';
import { alarmSentence, brokenLimit, isOutOfSpec, lotResult, specAt, specVerdict } from '@shared/spc';
import type { AlarmSignal, AlarmResolution, AlarmStatus } from '@shared/schemas/alarms';
import { recordAudit } from '../db/audit';
import { holdOutOfSpecLots } from '../lots/holds';
import type { Database } from '../db/client';
import { HttpError, notFound } from '../http/errors';
import type { CharacteristicChart, ChartInputs } from './chart-assembly';
import { arr, type Executor } from './db';

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
    select id, rule, chart, lot_id, status, resolution, point_index, statistic, description from alarms where characteristic_id = ${opts.characteristicId}`);
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

export interface TriageRequest {
  id: number;
  action: 'acknowledge' | 'close';
  /** What was checked or decided, for the record. */
  note: string;
  userId: number;
}

/** A person acknowledges or closes an alarm with a note, recorded in the audit trail; a closed alarm stays closed. */
export async function triageAlarm(db: Database, req: TriageRequest): Promise<void> {
  const { id, action, note, userId } = req;
  await db.transaction(async (tx) => {
    const cur = await tx.execute<{ status: string }>(sql`select status from alarms where id = ${id} for update`);
    if (!cur.rows[0]) throw notFound(`Alarm ${id}`);
    const status = cur.rows[0].status;
    if (status === 'closed') throw new HttpError(409, `Alarm ${id} is already closed`);
    if (action === 'acknowledge' && status !== 'open') throw new HttpError(409, `Alarm ${id} is already acknowledged`);
    if (action === 'acknowledge') {
      await tx.execute(sql`update alarms set status = 'acknowledged', acknowledged_at = now(), acknowledged_by = ${userId}, acknowledge_note = ${note}, updated_at = now() where id = ${id}`);
    } else {
      await tx.execute(sql`update alarms set status = 'closed', resolution = 'by-user', closed_at = now(), closed_by = ${userId}, close_note = ${note}, updated_at = now() where id = ${id}`);
    }
    await recordAudit(tx, { actorId: userId, action, entity: 'alarm', entityId: id, before: { status }, after: { status: action === 'acknowledge' ? 'acknowledged' : 'closed' }, reason: note });
  });
}
