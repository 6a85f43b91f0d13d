// One characteristic of a run, in one transaction: chart points in production order, limits,
// violations, capability snapshot, alarms and their e-mails, and the item's own status. A retry
// after a crash either finds the item done or does the whole thing again; nothing half-written
// can be seen. When the inputs are the same as last time nothing is written but the item's status.
import { sql } from 'drizzle-orm';
import type { Database } from '../db/client';
import { specAt } from '@shared/spc';
import { buildChart, chartFingerprint } from './chart-assembly';
import { loadChartInputs } from './chart-load';
import { findingsOf, reconcileAlarms, type PreviousSnapshot } from './alarms';
import { settleRun } from './runs';
import { arr, CHARACTERISTIC_LOCK, type Executor } from './db';
import { queueRunMail } from '../mail/notify';
import { capabilityThreshold, watchCapability } from './capability-alarm';

export interface CharacteristicOutcome {
  skipped: boolean;
  changed: boolean;
  raised: number;
  resolved: number;
}

type ItemRow = { status: string; attempts: number };

/** Marks the item running (attempt n) in its own short transaction, so that the runs page shows it. */
async function startAttempt(db: Database, runId: number, characteristicId: number, worker: string): Promise<ItemRow | null> {
  const res = await db.execute<ItemRow>(sql`
    with item as (
      update spc_run_items set status = case when status = 'succeeded' then status else 'running'::spc_run_status end,
        attempts = case when status = 'succeeded' then attempts else attempts + 1 end,
        worker = case when status = 'succeeded' then worker else ${worker} end,
        started_at = coalesce(started_at, now())
      where run_id = ${runId} and characteristic_id = ${characteristicId}
      returning status, attempts),
    run as (update spc_runs set status = 'running', started_at = coalesce(started_at, now()) where id = ${runId} and status = 'queued')
    select status, attempts from item`);
  return res.rows[0] ?? null;
}

export interface RunCharacteristicOptions {
  runId: number;
  characteristicId: number;
  worker: string;
  publicUrl: string;
  /** Test seam of the reliability tests: a pause inside the transaction, to be killed in the middle of writing. */
  pauseMs?: number;
}

export async function runCharacteristic(db: Database, opts: RunCharacteristicOptions): Promise<CharacteristicOutcome> {
  const { runId, characteristicId } = opts;
  const item = await startAttempt(db, runId, characteristicId, opts.worker);
  if (!item || item.status === 'succeeded') return { skipped: true, changed: false, raised: 0, resolved: 0 };

  return db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${CHARACTERISTIC_LOCK}, ${characteristicId})`);
    // The job's queries are small; starting parallel query workers for them costs more than it saves.
    await tx.execute(sql`set local max_parallel_workers_per_gather = 0`);
    const current = await tx.execute<{ status: string }>(sql`select status from spc_run_items where run_id = ${runId} and characteristic_id = ${characteristicId} for update`);
    if (current.rows[0]?.status === 'succeeded') return { skipped: true, changed: false, raised: 0, resolved: 0 };

    const now = new Date();
    const inputs = await loadChartInputs(tx, characteristicId, {}, now, { events: false });
    if (!inputs) throw new Error(`Characteristic ${characteristicId} does not exist`);
    // The capability threshold is an input too: changing it judges the capability again at the next run.
    const threshold = await capabilityThreshold(tx, characteristicId);
    const fingerprint = `${chartFingerprint(inputs)}:${specAt(inputs.specs, now)?.revision ?? '-'}:${threshold}`;
    const prevRes = await tx.execute<{ fingerprint: string; period_to: Date | null; computed_at: Date }>(sql`
      select fingerprint, period_to, computed_at from spc_snapshots where characteristic_id = ${characteristicId} for update`);
    const prev = prevRes.rows[0];

    let outcome: CharacteristicOutcome = { skipped: false, changed: false, raised: 0, resolved: 0 };
    if (!prev || prev.fingerprint !== fingerprint) {
      const { chart } = buildChart(inputs);
      const previous: PreviousSnapshot | null = prev ? { periodTo: prev.period_to ? new Date(prev.period_to) : null, computedAt: new Date(prev.computed_at) } : null;
      const reconciled = await reconcileAlarms(tx, { characteristicId, findings: findingsOf(chart, inputs, previous), runId });
      const capabilityAlarm = await watchCapability(tx, { characteristicId, inputs, threshold, runId });
      const location = chart.points.map((pt) => pt.location);
      const dispersion = chart.points.map((pt) => pt.dispersion);
      const values = {
        lotIds: chart.points.map((pt) => pt.lotId),
        excluded: chart.points.filter((pt) => pt.excluded).map((pt) => pt.lotId),
        outOfSpec: chart.points.filter((pt) => pt.outOfSpec).map((pt) => pt.lotId),
      };
      await tx.execute(sql`
        insert into spc_snapshots (characteristic_id, run_id, computed_at, fingerprint, phase, point_count, period_from, period_to, lot_ids, location, dispersion,
                                   excluded_lot_ids, out_of_spec_lot_ids, limits, violations, capability, reasons)
        values (${characteristicId}, ${runId}, ${now.toISOString()}::timestamptz, ${fingerprint}, ${chart.limits.source === 'frozen' ? 'II' : 'I'}, ${chart.points.length},
                ${inputs.lots[0]?.producedAt.toISOString() ?? null}::timestamptz, ${inputs.lots.at(-1)?.producedAt.toISOString() ?? null}::timestamptz,
                ${arr(values.lotIds)}::int[], ${arr(location)}::float8[], ${arr(dispersion)}::float8[], ${arr(values.excluded)}::int[], ${arr(values.outOfSpec)}::int[],
                ${JSON.stringify(chart.limits)}::jsonb, ${JSON.stringify(chart.violations)}::jsonb, ${chart.capability ? JSON.stringify(chart.capability) : null}::jsonb, ${JSON.stringify(chart.reasons)}::jsonb)
        on conflict (characteristic_id) do update set
          run_id = excluded.run_id, computed_at = excluded.computed_at, fingerprint = excluded.fingerprint, phase = excluded.phase, point_count = excluded.point_count,
          period_from = excluded.period_from, period_to = excluded.period_to, lot_ids = excluded.lot_ids, location = excluded.location, dispersion = excluded.dispersion,
          excluded_lot_ids = excluded.excluded_lot_ids, out_of_spec_lot_ids = excluded.out_of_spec_lot_ids, limits = excluded.limits, violations = excluded.violations,
          capability = excluded.capability, reasons = excluded.reasons`);
      outcome = { skipped: false, changed: true, raised: reconciled.raised.length + reconciled.reopened.length + (capabilityAlarm === null ? 0 : 1), resolved: reconciled.resolved.length };
    }
    if (opts.pauseMs) await new Promise((r) => setTimeout(r, opts.pauseMs));

    await tx.execute(sql`
      update spc_run_items set status = 'succeeded', changed = ${outcome.changed}, alarms_raised = ${outcome.raised}, alarms_resolved = ${outcome.resolved},
        error = null, finished_at = now()
      where run_id = ${runId} and characteristic_id = ${characteristicId}`);
    await settleRunAndMail(tx, runId, opts.publicUrl);
    return outcome;
  });
}

/**
 * Settles the run; the item that finishes it queues the run's e-mails, one per lot with every signal
 * the run found on it, in the same transaction (the dedupe key keeps a second settling harmless).
 */
async function settleRunAndMail(tx: Executor, runId: number, publicUrl: string): Promise<void> {
  await settleRun(tx, runId);
  const run = await tx.execute<{ finished: boolean }>(sql`select status in ('succeeded', 'failed') as finished from spc_runs where id = ${runId}`);
  if (run.rows[0]?.finished) await queueRunMail(tx, runId, publicUrl);
}

/** After an attempt failed: the last one fails the item with the error, an earlier one leaves the error for all to see until the retry. */
export async function recordFailedAttempt(db: Database, opts: { runId: number; characteristicId: number; error: string; final: boolean; publicUrl: string }): Promise<void> {
  await db.transaction(async (tx) => {
    await tx.execute(sql`
      update spc_run_items set status = ${opts.final ? 'failed' : 'queued'}::spc_run_status, error = ${opts.error.slice(0, 2000)},
        finished_at = case when ${opts.final} then now() end
      where run_id = ${opts.runId} and characteristic_id = ${opts.characteristicId} and status <> 'succeeded'`);
    if (opts.final) await settleRunAndMail(tx, opts.runId, opts.publicUrl);
  });
}
