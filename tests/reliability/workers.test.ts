// Worker processes that die, a database that restarts, and two workers sharing one run. Each test
// has its own PostgreSQL cluster, so the test server's workers never take these jobs.
import { afterEach, describe, expect, it } from 'vitest';
import { sql, type SQL } from 'drizzle-orm';
import type PgBoss from 'pg-boss';
import { seedScaledPlant } from '@tests/support/scaled-plant';
import { startPrivateCluster, type PrivateCluster } from '@tests/support/private-cluster';
import { freePort } from '@scripts/lib/cluster';
import { addSubscriber, expectWholeResults, producer, spawnWorker, startFullRun, stopWorkers, waitForRun, type WorkerProcess } from './support';

let cluster: PrivateCluster | null = null;
let boss: PgBoss | null = null;
let workers: WorkerProcess[] = [];

afterEach(async () => {
  await stopWorkers(workers);
  workers = [];
  await boss?.stop({ graceful: false }).catch(() => undefined);
  boss = null;
  await cluster?.destroy();
  cluster = null;
});

async function ready(w: WorkerProcess, timeoutMs = 30_000) {
  const deadline = Date.now() + timeoutMs;
  while (!w.output().includes('SPC worker ready')) {
    if (w.child.exitCode !== null) throw new Error(`worker exited: ${w.output()}`);
    if (Date.now() > deadline) throw new Error(`worker not ready: ${w.output()}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

const items = (runId: number) =>
  cluster!.db.execute<{ characteristic_id: number; status: string; attempts: number; worker: string | null; error: string | null }>(sql`
    select characteristic_id, status, attempts, worker, error from spc_run_items where run_id = ${runId} order by characteristic_id`);

/** Waits until `check` answers true; on time-out, says what `diagnosis` finds. */
async function until(check: () => Promise<boolean>, what: string, timeoutMs = 30_000, diagnosis?: () => Promise<string>) {
  const deadline = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting until ${what}${diagnosis ? `: ${await diagnosis()}` : ''}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

/**
 * Starts a run whose characteristics commit only while the test allows it, SIGKILLs the worker once
 * `afterDone` have succeeded while at least one more has written everything inside its transaction
 * but not committed, and answers the run and the characteristics the worker left running.
 *
 * A kill at a moment picked by polling raced the worker: an item read as running could commit
 * between the read and the kill, and then count as killed with one attempt. Here the run's row is
 * held locked, so every transaction of the worker stops at its last step (settling the run); the
 * lock is let go for one round of them at a time until enough have succeeded. The worker is paused
 * (SIGSTOP) while the run is started and its row locked, so that no characteristic gets past the
 * gate first. Their COMMIT would have come from the dead process, so once the lock is let go after
 * the kill PostgreSQL can only roll them back; the items are read after that, and before another
 * worker starts.
 */
async function killInsideItsTransaction(worker: WorkerProcess, start: () => Promise<number>, afterDone: number): Promise<{ runId: number; killed: number[] }> {
  const db = cluster!.db;
  worker.kill('SIGSTOP');
  const runId = await start();
  const count = async (query: SQL) => (await db.execute<{ n: number }>(query)).rows[0].n;
  const holder = await db.$client.connect();
  const holderPid = (await holder.query<{ pid: number }>('select pg_backend_pid() as pid')).rows[0].pid;
  const waiting = async () => (await count(sql`select count(*)::int as n from pg_stat_activity where ${holderPid} = any(pg_blocking_pids(pid))`)) > 0;
  const doneBefore: number[] = [];
  const diagnosis = async () =>
    JSON.stringify({
      doneBefore,
      items: (await db.execute(sql`select status, count(*)::int as n from spc_run_items where run_id = ${runId} group by 1`)).rows,
      sessions: (await db.execute(sql`
        select pid, state, wait_event_type, wait_event, pg_blocking_pids(pid) as blocked_by, left(query, 80) as query
        from pg_stat_activity where backend_type = 'client backend' and pid <> pg_backend_pid()`)).rows,
      worker: worker.output().slice(-2000),
    });
  try {
    for (;;) {
      await holder.query('begin');
      // NO KEY UPDATE: the alarms' foreign-key checks (KEY SHARE) pass, settling the run waits.
      await holder.query('select id from spc_runs where id = $1 for no key update', [runId]);
      worker.kill('SIGCONT');
      await until(waiting, `a characteristic waits to settle the run`, 30_000, diagnosis);
      const done = await count(sql`select count(*)::int as n from spc_run_items where run_id = ${runId} and status = 'succeeded'`);
      if (done >= afterDone) break;
      doneBefore.push(done);
      await holder.query('commit');
    }
    worker.kill('SIGKILL');
    await worker.exited;
  } finally {
    await holder.query('commit').catch(() => undefined);
    holder.release();
  }
  await until(
    async () =>
      (await count(sql`
        select count(*)::int as n from pg_stat_activity
        where backend_type = 'client backend' and xact_start is not null and pid <> pg_backend_pid()`)) === 0,
    "PostgreSQL rolls back the dead worker's transactions",
    30_000,
    diagnosis,
  );
  return { runId, killed: (await items(runId)).rows.filter((r) => r.status === 'running').map((r) => r.characteristic_id) };
}

describe('worker processes', () => {
  it('two workers started at once split the characteristics without doing any twice', async () => {
    cluster = await startPrivateCluster('split');
    const plant = await seedScaledPlant(cluster.db, { characteristics: 40, points: 200 });
    ({ boss } = await producer(cluster.databaseUrl));
    const env = { LOG_LEVEL: 'info', SPC_WORKER_CONCURRENCY: '1', SPC_TEST_PAUSE_MS: '60' };
    workers = [spawnWorker(cluster.databaseUrl, env), spawnWorker(cluster.databaseUrl, env)];
    await Promise.all(workers.map((w) => ready(w)));

    const runId = await startFullRun(cluster.db, { boss: async () => boss!, stop: async () => undefined });
    const run = await waitForRun(cluster.db, runId);
    expect(run).toMatchObject({ status: 'succeeded', characteristics: 40, done: 40, failed: 0 });
    const rows = (await items(runId)).rows;
    expect(rows.every((r) => r.status === 'succeeded' && r.attempts === 1)).toBe(true);
    const byWorker = new Map<string, number>();
    for (const r of rows) byWorker.set(r.worker!, (byWorker.get(r.worker!) ?? 0) + 1);
    expect(byWorker.size).toBe(2);
    for (const w of workers) {
      const key = [...byWorker.keys()].find((k) => k.endsWith(`:${w.child.pid}`));
      expect(key, `items of worker ${w.child.pid}`).toBeDefined();
      expect(byWorker.get(key!)).toBeGreaterThanOrEqual(8);
    }
    // A worker marks its job completed just after the characteristic's transaction has committed, so
    // the last job may still be active when the run is already seen finished.
    await until(async () => (await cluster!.db.execute<{ n: number }>(sql`select count(*)::int as n from pgboss.job where state = 'active'`)).rows[0].n === 0, 'the last job is marked completed');
    const jobs = await cluster.db.execute<{ state: string; retry_count: number; n: number }>(sql`
      select state, retry_count, count(*)::int as n from (select state, retry_count from pgboss.job union all select state, retry_count from pgboss.archive) j group by 1, 2`);
    expect(jobs.rows).toEqual([{ state: 'completed', retry_count: 0, n: 40 }]);
    await expectWholeResults(cluster.db, plant.characteristicIds);
  }, 120_000);

  it('a worker killed with SIGKILL in the middle of a run is replaced and the run finishes with nothing doubled or half-written; e-mail failures never hold it up', async () => {
    cluster = await startPrivateCluster('kill');
    const plant = await seedScaledPlant(cluster.db, { characteristics: 30, points: 200 });
    await addSubscriber(cluster.db, plant.productIds);
    ({ boss } = await producer(cluster.databaseUrl));
    const queue = { boss: async () => boss!, stop: async () => undefined };
    // A relay that is not there: the outbox keeps the messages and the run does not wait for them.
    const env = { SPC_TEST_PAUSE_MS: '150', SMTP_URL: `smtp://127.0.0.1:${await freePort()}`, MAIL_POLL_MS: '200' };
    const first = spawnWorker(cluster.databaseUrl, env);
    workers.push(first);
    expect((await waitForRun(cluster.db, await startFullRun(cluster.db, queue))).status).toBe('succeeded');

    // A new lot far above the limits and the specification for every characteristic: two immediate alarms each.
    await cluster.db.execute(sql`
      insert into lots (lot_number, product_id, line_id, produced_at, shift)
      select code || '-LATEST', id, line_id, '2030-01-01T06:00:00Z', 'early' from products where id = any(${sql.param(plant.productIds)}::int[])`);
    await cluster.db.execute(sql`
      insert into measurements (lot_id, characteristic_id, replicate, value, source)
      select l.id, c.id, 1, 170, 'upload' from characteristics c join lots l on l.product_id = c.product_id and l.lot_number like '%-LATEST'`);

    const { runId, killed: killedWhileRunning } = await killInsideItsTransaction(first, () => startFullRun(cluster!.db, queue), 6);
    workers.push(spawnWorker(cluster.databaseUrl, env));
    expect(killedWhileRunning.length).toBeGreaterThan(0);
    const run = await waitForRun(cluster.db, runId);
    expect(run).toMatchObject({ status: 'succeeded', done: 30, failed: 0 });
    const rows = (await items(runId)).rows;
    const second = workers[1].child.pid;
    for (const id of killedWhileRunning) {
      const r = rows.find((x) => x.characteristic_id === id)!;
      expect(r.status).toBe('succeeded');
      expect(r.attempts).toBeGreaterThanOrEqual(2);
      expect(r.worker).toMatch(new RegExp(`:${second}$`));
    }

    const whole = await expectWholeResults(cluster.db, plant.characteristicIds);
    // 30 characteristics × (value beyond its UCL, moving range beyond its UCL, out of specification): 90 alarms.
    const immediate = await cluster.db.execute<{ rule: string; chart: string; n: number }>(sql`
      select a.rule, a.chart, count(*)::int as n from alarms a join lots l on l.id = a.lot_id where l.lot_number like '%-LATEST' and a.rule in ('we1', 'out-of-spec') group by 1, 2 order by 1, 2`);
    expect(immediate.rows).toEqual([
      { rule: 'out-of-spec', chart: 'location', n: 30 },
      { rule: 'we1', chart: 'dispersion', n: 30 },
      { rule: 'we1', chart: 'location', n: 30 },
    ]);
    // One message per lot and run for the one subscriber: three products, ten characteristics each, so three
    // messages of thirty signals — however often the killed items were tried.
    expect(whole.mails).toBe(3);
    // The lot at 170 also drags each characteristic's capability below 1.33: one falling-capability alarm each,
    // left for the morning digest (a trend, not a lot to stop), so the messages list the other 90.
    const capability = await cluster.db.execute<{ n: number }>(sql`
      select count(*)::int as n from alarms a join lots l on l.id = a.lot_id where l.lot_number like '%-LATEST' and a.rule = 'capability'`);
    expect(capability.rows[0].n).toBe(30);
    const listed = await cluster.db.execute<{ n: number }>(sql`select sum(jsonb_array_length(refs -> 'alarmIds'))::int as n from mail_outbox where kind = 'alarm'`);
    expect(listed.rows[0].n).toBe(90);
    const failing = async () => (await cluster!.db.execute<{ n: number }>(sql`select count(*)::int as n from mail_outbox where status = 'pending' and attempts >= 1 and last_error is not null`)).rows[0].n;
    const deadline = Date.now() + 15_000;
    while ((await failing()) === 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 200));
    expect(await failing()).toBeGreaterThan(0);
    const sent = await cluster.db.execute<{ n: number }>(sql`select count(*)::int as n from mail_outbox where status = 'sent'`);
    expect(sent.rows[0].n).toBe(0);
  }, 150_000);

  it('PostgreSQL restarting during a run makes the affected jobs retry and succeed', async () => {
    cluster = await startPrivateCluster('restart');
    const plant = await seedScaledPlant(cluster.db, { characteristics: 30, points: 200 });
    ({ boss } = await producer(cluster.databaseUrl));
    const queue = { boss: async () => boss!, stop: async () => undefined };
    const worker = spawnWorker(cluster.databaseUrl, { SPC_TEST_PAUSE_MS: '200' });
    workers.push(worker);
    const runId = await startFullRun(cluster.db, queue);
    let restarted = false;
    await waitForRun(cluster.db, runId, 90_000, (run) => {
      if (restarted || run.done < 5 || run.running < 1) return;
      cluster!.restart();
      restarted = true;
    });
    expect(restarted).toBe(true);
    const run = await waitForRun(cluster.db, runId);
    expect(run).toMatchObject({ status: 'succeeded', done: 30, failed: 0 });
    const rows = (await items(runId)).rows;
    expect(rows.every((r) => r.status === 'succeeded')).toBe(true);
    expect(rows.reduce((s, r) => s + r.attempts, 0)).toBeGreaterThan(30);
    expect(worker.child.exitCode).toBeNull();
    await expectWholeResults(cluster.db, plant.characteristicIds);
  }, 150_000);
});
