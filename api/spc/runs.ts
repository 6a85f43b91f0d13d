// SPC runs: created with one item and one queue job per characteristic in a single transaction, so a
// run never exists without its jobs (nor jobs without their run).
import { randomUUID } from 'node:crypto';
import { sql } from 'drizzle-orm';
import { drizzle } from 'drizzle-orm/node-postgres';
import type pg from 'pg';
import { recordAudit } from '../db/audit';
import type { Database } from '../db/client';
import { CHARACTERISTIC_QUEUE, jobSettings, type JobSettings, type SpcQueue } from './queue';
import type { Executor } from './db';
import type { RunDetail, RunStatus, RunSummary, RunTrigger } from '@shared/schemas/runs';

export type { RunDetail, RunStatus, RunSummary, RunTrigger } from '@shared/schemas/runs';

export interface StartRunRequest {
  trigger: RunTrigger;
  /** Only these characteristics (an incremental run); all active ones of the plant (or every plant) otherwise. */
  characteristicIds?: number[];
  plantId?: number | null;
  requestedBy?: number | null;
  /** A nightly run's plant and local date: a second scheduler asking for the same run gets null. */
  scheduleKey?: string;
}

export interface CharacteristicJob {
  runId: number;
  characteristicId: number;
}

/** Creates the run, its items and their jobs; null when a run with the same schedule key exists. */
export async function startRun(db: Database, queue: SpcQueue, req: StartRunRequest, settings: JobSettings = jobSettings()): Promise<number | null> {
  const boss = await queue.boss();
  const client: pg.PoolClient = await db.$client.connect();
  try {
    await client.query('begin');
    const ids = req.characteristicIds
      ? (await client.query<{ id: number }>('select id from characteristics where id = any($1::int[]) order by id', [[...new Set(req.characteristicIds)]])).rows.map((r) => r.id)
      : (
          await client.query<{ id: number }>(
            `select c.id from characteristics c join products p on p.id = c.product_id
             where c.active and p.active and ($1::int is null or p.plant_id = $1) order by c.id`,
            [req.plantId ?? null],
          )
        ).rows.map((r) => r.id);
    const kind = req.characteristicIds ? 'incremental' : 'full';
    const run = await client.query<{ id: number }>(
      `insert into spc_runs (kind, trigger, plant_id, schedule_key, requested_by, characteristics, status, finished_at)
       values ($1, $2, $3, $4, $5, $6, case when $6 = 0 then 'succeeded'::spc_run_status else 'queued'::spc_run_status end, case when $6 = 0 then now() end)
       on conflict (schedule_key) do nothing returning id`,
      [kind, req.trigger, req.plantId ?? null, req.scheduleKey ?? null, req.requestedBy ?? null, ids.length],
    );
    if (!run.rows[0]) {
      await client.query('rollback');
      return null;
    }
    const runId = run.rows[0].id;
    if (ids.length) {
      const jobIds = ids.map(() => randomUUID());
      await client.query('insert into spc_run_items (run_id, characteristic_id, job_id) select $1, * from unnest($2::int[], $3::text[])', [runId, ids, jobIds]);
      await boss.insert(
        ids.map((characteristicId, i) => ({
          id: jobIds[i],
          name: CHARACTERISTIC_QUEUE,
          data: { runId, characteristicId } satisfies CharacteristicJob,
          singletonKey: String(characteristicId),
          retryLimit: settings.retryLimit,
          retryDelay: settings.retryDelaySeconds,
          retryBackoff: true,
          expireInSeconds: settings.expireSeconds,
        })),
        { db: { executeSql: (text: string, values: unknown[]) => client.query(text, values) } },
      );
    }
    // A run someone started is theirs in the audit trail; the others follow from a change recorded there.
    if (req.trigger === 'manual') {
      await recordAudit(drizzle(client), { actorId: req.requestedBy ?? null, action: 'start', entity: 'spc run', entityId: runId, after: { characteristicIds: req.characteristicIds ?? 'all' } });
    }
    await client.query('commit');
    return runId;
  } catch (err) {
    await client.query('rollback').catch(() => undefined);
    throw err;
  } finally {
    client.release();
  }
}

/** A run whose items the caller works through itself with runCharacteristic, without queue jobs: the demo seed's runs. */
export async function createRunRecord(db: Executor, req: { kind: 'full' | 'incremental'; trigger: RunTrigger; characteristicIds: number[]; requestedBy?: number | null }): Promise<number> {
  const res = await db.execute<{ id: number }>(sql`
    insert into spc_runs (kind, trigger, requested_by, characteristics)
    values (${req.kind}, ${req.trigger}, ${req.requestedBy ?? null}, ${req.characteristicIds.length}) returning id`);
  const runId = res.rows[0].id;
  await db.execute(sql`insert into spc_run_items (run_id, characteristic_id) select ${runId}, unnest(${sql.param(req.characteristicIds)}::int[])`);
  return runId;
}

const summaryColumns = sql`
  r.id, r.kind, r.trigger, r.status, r.characteristics, u.name as requested_by,
  r.created_at, r.started_at, r.finished_at,
  coalesce(i.done, 0)::int as done, coalesce(i.failed, 0)::int as failed, coalesce(i.running, 0)::int as running,
  coalesce(i.raised, 0)::int as alarms_raised, coalesce(i.resolved, 0)::int as alarms_resolved`;
const itemCounts = sql`
  left join lateral (
    select count(*) filter (where status = 'succeeded') as done, count(*) filter (where status = 'failed') as failed,
           count(*) filter (where status = 'running') as running, sum(alarms_raised) as raised, sum(alarms_resolved) as resolved
    from spc_run_items where run_id = r.id) i on true
  left join users u on u.id = r.requested_by`;

type SummaryRow = {
  id: number;
  kind: 'full' | 'incremental';
  trigger: RunTrigger;
  status: RunStatus;
  characteristics: number;
  requested_by: string | null;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
  done: number;
  failed: number;
  running: number;
  alarms_raised: number;
  alarms_resolved: number;
};

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
const toSummary = (r: SummaryRow): RunSummary => ({
  id: r.id,
  kind: r.kind,
  trigger: r.trigger,
  status: r.status,
  characteristics: r.characteristics,
  done: r.done,
  failed: r.failed,
  running: r.running,
  alarmsRaised: r.alarms_raised,
  alarmsResolved: r.alarms_resolved,
  requestedBy: r.requested_by,
  createdAt: iso(r.created_at)!,
  startedAt: iso(r.started_at),
  finishedAt: iso(r.finished_at),
});

export async function listRuns(db: Executor, limit = 50): Promise<RunSummary[]> {
  const res = await db.execute<SummaryRow>(sql`select ${summaryColumns} from spc_runs r ${itemCounts} order by r.id desc limit ${limit}`);
  return res.rows.map(toSummary);
}

export async function getRun(db: Executor, id: number): Promise<RunDetail | null> {
  const res = await db.execute<SummaryRow>(sql`select ${summaryColumns} from spc_runs r ${itemCounts} where r.id = ${id}`);
  if (!res.rows[0]) return null;
  const items = await db.execute<{ characteristic_id: number; code: string; attempts: number; error: string | null; status: RunStatus }>(sql`
    select i.characteristic_id, c.code, i.attempts, i.error, i.status from spc_run_items i join characteristics c on c.id = i.characteristic_id
    where i.run_id = ${id} and i.error is not null order by c.code`);
  const pick = (s: (st: RunStatus) => boolean) =>
    items.rows.filter((r) => s(r.status)).map((r) => ({ characteristicId: r.characteristic_id, characteristicCode: r.code, attempts: r.attempts, error: r.error }));
  return { ...toSummary(res.rows[0]), failures: pick((s) => s === 'failed'), retrying: pick((s) => s === 'queued' || s === 'running') };
}

/**
 * Sets the run's status from its items. Call inside the transaction that finished an item: the row
 * lock makes concurrent finishers count one after the other, so the last one sees every item done.
 * "No key update" because the same transactions hold key-share locks on the run row (alarm and
 * snapshot rows refer to it), which a plain FOR UPDATE would wait for — a deadlock between workers.
 */
export async function settleRun(tx: Executor, runId: number): Promise<void> {
  await tx.execute(sql`select id from spc_runs where id = ${runId} for no key update`);
  await tx.execute(sql`
    with c as (
      select count(*) filter (where status in ('succeeded', 'failed')) as finished, count(*) filter (where status = 'failed') as failed, count(*) as total
      from spc_run_items where run_id = ${runId})
    update spc_runs set
      status = case when c.finished = c.total then (case when c.failed > 0 then 'failed' else 'succeeded' end)::spc_run_status else 'running'::spc_run_status end,
      started_at = coalesce(started_at, now()),
      finished_at = case when c.finished = c.total then coalesce(finished_at, now()) end
    from c where id = ${runId}`);
}

/**
 * Items whose job ended failed without the worker saying so (it died during its last attempt) are
 * marked failed with the queue's error, and their runs settled.
 */
export async function sweepRuns(db: Database): Promise<number> {
  return db.transaction(async (tx) => {
    // Driven by the few unfinished items, each job looked up by its primary key (name, id).
    const res = await tx.execute<{ run_id: number }>(sql`
      update spc_run_items i set status = 'failed', finished_at = now(),
        error = coalesce(f.output->>'message', f.output->'value'->>'message', 'The job failed')
      from (
        select u.id, coalesce(j.output, a.output) as output
        from spc_run_items u
        left join pgboss.job j on j.name = ${CHARACTERISTIC_QUEUE} and j.id = u.job_id::uuid and j.state = 'failed'
        left join pgboss.archive a on a.name = ${CHARACTERISTIC_QUEUE} and a.id = u.job_id::uuid and a.state = 'failed'
        where u.status in ('queued', 'running') and u.job_id is not null and (j.id is not null or a.id is not null)
      ) f
      where i.id = f.id
      returning i.run_id`);
    const runs = [...new Set(res.rows.map((r) => r.run_id))].sort((a, b) => a - b);
    for (const runId of runs) await settleRun(tx, runId);
    return res.rows.length;
  });
}
