// The falling-capability alarm of a run: the characteristic's capability over the rolling window of its
// newest lots (shared/spc/capability-watch.ts) against its threshold (the characteristic's, else the
// plant's, else 1.33), raised once per crossing, remembered in capability_watch. The alarm sits at the
// newest lot of the chart, on the location chart, and goes through the run's e-mail like every run alarm
// (queueRunMail picks the run's open alarms).
import { sql } from 'drizzle-orm';
import { CAPABILITY_WINDOW_LOTS, capabilityCrossing, capabilityReading, capabilitySentence, DEFAULT_CAPABILITY_THRESHOLD } from '@shared/spc';
import { recordAudit } from '../db/audit';
import { buildChart, type ChartInputs } from './chart-assembly';
import { CAPABILITY } from './alarms';
import { arr, type Executor } from './db';

/** The threshold in force: the characteristic's own, else its plant's, else DEFAULT_CAPABILITY_THRESHOLD. */
export async function capabilityThreshold(tx: Executor, characteristicId: number): Promise<number> {
  const res = await tx.execute<{ threshold: number | null }>(sql`
    select coalesce(c.capability_threshold, pl.capability_threshold) as threshold
    from characteristics c join products p on p.id = c.product_id join plants pl on pl.id = p.plant_id where c.id = ${characteristicId}`);
  const t = res.rows[0]?.threshold;
  return t === null || t === undefined ? DEFAULT_CAPABILITY_THRESHOLD : Number(t);
}

/** The chart of the rolling window: the newest CAPABILITY_WINDOW_LOTS lots, as the chart API shows it for that window (from, to). */
export function capabilityWindow(inputs: ChartInputs) {
  const lots = inputs.lots.slice(-CAPABILITY_WINDOW_LOTS);
  if (!lots.length) return null;
  const window = { from: lots[0].producedAt, to: lots.at(-1)!.producedAt };
  const { chart } = buildChart({ ...inputs, lots, window });
  return { chart, lots, window };
}

type WatchRow = { below: boolean };

/**
 * Judges the window's capability and keeps capability_watch; on a downward crossing raises the alarm
 * (or opens again the one already at that lot). Returns the alarm's id when one was raised.
 */
export async function watchCapability(tx: Executor, o: { characteristicId: number; inputs: ChartInputs; threshold: number; runId: number | null }): Promise<number | null> {
  const w = capabilityWindow(o.inputs);
  if (!w) return null;
  // In control: no run-rule signal among the window's points (the rules skip excluded points).
  const reading = capabilityReading(w.chart.capability, w.chart.violations.length === 0);
  if (!reading) return null;
  const prev = await tx.execute<WatchRow>(sql`select below from capability_watch where characteristic_id = ${o.characteristicId} for update`);
  const wasBelow = prev.rows[0]?.below ?? null;
  const crossing = capabilityCrossing(wasBelow, reading, o.threshold);

  let alarmId: number | null = null;
  if (crossing.raise) {
    const newest = w.lots.at(-1)!;
    const description = capabilitySentence({
      index: reading.index,
      value: reading.value,
      threshold: o.threshold,
      lots: w.lots.length,
      values: w.chart.capability!.n,
      fromLot: w.lots[0].lotNumber,
      toLot: newest.lotNumber,
    });
    const pointIndex = o.inputs.lots.length - 1;
    // One alarm per characteristic and lot (the dedupe key): a second crossing at the same newest lot opens that alarm again.
    const res = await tx.execute<{ id: number }>(sql`
      insert into alarms (characteristic_id, lot_id, rule, chart, point_index, statistic, "values", limit_name, limit_value, description, source, run_id)
      values (${o.characteristicId}, ${newest.lotId}, ${CAPABILITY}, 'location', ${pointIndex}, ${reading.value}, ${arr(newest.values)}::float8[], ${reading.index},
              ${o.threshold}, ${description}, 'run', ${o.runId}::int)
      on conflict (characteristic_id, rule, chart, lot_id) do update set
        status = 'open', resolution = null, outcome = null, cause_category = null, closed_at = null, closed_by = null, close_note = null,
        point_index = excluded.point_index, statistic = excluded.statistic, "values" = excluded."values", limit_name = excluded.limit_name,
        limit_value = excluded.limit_value, description = excluded.description, run_id = excluded.run_id, detected_at = now(), updated_at = now()
      returning id`);
    alarmId = res.rows[0].id;
    await recordAudit(tx, {
      actorId: null,
      action: 'raise falling capability',
      entity: 'alarm',
      entityId: alarmId,
      after: { index: reading.index, value: reading.value, threshold: o.threshold, lots: w.lots.length },
      reason: description,
    });
  }
  await tx.execute(sql`
    insert into capability_watch (characteristic_id, below, index_name, index_value, threshold, changed_at, alarm_id)
    values (${o.characteristicId}, ${crossing.below}, ${reading.index}, ${reading.value}, ${o.threshold}, now(), ${alarmId}::int)
    on conflict (characteristic_id) do update set
      below = excluded.below, index_name = excluded.index_name, index_value = excluded.index_value, threshold = excluded.threshold,
      changed_at = case when capability_watch.below <> excluded.below then now() else capability_watch.changed_at end,
      alarm_id = coalesce(excluded.alarm_id, capability_watch.alarm_id)`);
  return alarmId;
}
