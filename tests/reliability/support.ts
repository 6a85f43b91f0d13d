// Real worker processes (node + tsx running jobs/worker.ts) against a private cluster, and the
// checks that a run's stored results are whole: one snapshot per characteristic equal to the chart
// computed afresh, one alarm per finding, one e-mail per alarm and subscriber.
import { spawn, type ChildProcess } from 'node:child_process';
import { resolve } from 'node:path';
import { sql } from 'drizzle-orm';
import type PgBoss from 'pg-boss';
import type { Database } from '@api/db/client';
import { computeCharacteristicChart } from '@api/spc/chart-load';
import { fixedQueue, startBoss, type SpcQueue } from '@api/spc/queue';
import { getRun, startRun, type RunDetail } from '@api/spc/runs';

const root = resolve(import.meta.dirname, '..', '..');

export interface WorkerProcess {
  child: ChildProcess;
  output(): string;
  kill(signal: NodeJS.Signals): void;
  exited: Promise<number | null>;
}

export function spawnWorker(databaseUrl: string, env: Record<string, string> = {}): WorkerProcess {
  let output = '';
  const child = spawn(process.execPath, ['--import', 'tsx', 'jobs/worker.ts'], {
    cwd: root,
    env: {
      ...process.env,
      DATABASE_URL: databaseUrl,
      LOG_LEVEL: 'warn',
      SMTP_URL: '',
      SPC_POLL_MS: '100',
      SPC_SWEEP_MS: '1000',
      PGBOSS_MAINTENANCE_SECONDS: '1',
      SPC_WORKER_CONCURRENCY: '2',
      ...env,
    },
    stdio: ['ignore', 'pipe', 'pipe'],
    detached: true,
  });
  child.stdout!.on('data', (d) => (output += d));
  child.stderr!.on('data', (d) => (output += d));
  const exited = new Promise<number | null>((r) => child.once('exit', (code) => r(code)));
  return {
    child,
    output: () => output,
    kill(signal) {
      if (child.exitCode === null && child.pid) {
        try {
          process.kill(-child.pid, signal);
        } catch {
          // already gone
        }
      }
    },
    exited,
  };
}

export async function stopWorkers(workers: WorkerProcess[]): Promise<void> {
  for (const w of workers) w.kill('SIGTERM');
  await Promise.race([Promise.all(workers.map((w) => w.exited)), new Promise((r) => setTimeout(r, 8000))]);
  for (const w of workers) w.kill('SIGKILL');
}

/** Retries quickly, and an active job of a dead worker expires after 4 s. */
export const TEST_JOBS = { retryLimit: 3, retryDelaySeconds: 1, expireSeconds: 4 };

export async function producer(databaseUrl: string): Promise<{ boss: PgBoss; queue: SpcQueue }> {
  const boss = await startBoss({ connectionString: databaseUrl, supervise: false });
  return { boss, queue: fixedQueue(boss) };
}

export async function startFullRun(db: Database, queue: SpcQueue): Promise<number> {
  return (await startRun(db, queue, { trigger: 'manual' }, TEST_JOBS))!;
}

/** Polls the run until it ends, riding out a database that is away for a moment. */
export async function waitForRun(db: Database, id: number, timeoutMs = 90_000, onPoll?: (run: RunDetail) => void | Promise<void>): Promise<RunDetail> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const run = await getRun(db, id).catch(() => null);
    if (run) {
      await onPoll?.(run);
      if (run.status === 'succeeded' || run.status === 'failed') return run;
    }
    if (Date.now() > deadline) throw new Error(`run ${id} did not finish in ${timeoutMs} ms: ${JSON.stringify(run)}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

export async function addSubscriber(db: Database, productIds: number[]): Promise<number> {
  const u = await db.execute<{ id: number }>(sql`
    insert into users (email, name, role, password_hash) values ('manager@scaled.example', 'Scaled Quality Manager', 'quality_manager', 'not-a-hash') returning id`);
  const userId = u.rows[0].id;
  await db.execute(sql`insert into alarm_subscriptions (user_id, product_id, immediate, digest) select ${userId}, unnest(${sql.param(productIds)}::int[]), true, false`);
  return userId;
}

/** Every stored result agrees with a fresh computation; nothing is missing or doubled. */
export async function expectWholeResults(db: Database, characteristicIds: number[]): Promise<{ alarms: number; mails: number }> {
  const problems: string[] = [];
  let alarmCount = 0;
  for (const id of characteristicIds) {
    const chart = await computeCharacteristicChart(db, id);
    const snaps = await db.execute<{ lot_ids: number[]; violations: unknown; point_count: number }>(sql`select lot_ids, violations, point_count from spc_snapshots where characteristic_id = ${id}`);
    if (snaps.rows.length !== 1) {
      problems.push(`characteristic ${id}: ${snaps.rows.length} snapshots`);
      continue;
    }
    const snap = snaps.rows[0];
    if (snap.point_count !== chart.points.length || JSON.stringify(snap.lot_ids) !== JSON.stringify(chart.points.map((p) => p.lotId))) problems.push(`characteristic ${id}: snapshot points differ`);
    if (JSON.stringify(snap.violations) !== JSON.stringify(chart.violations)) problems.push(`characteristic ${id}: snapshot violations differ`);
    // One alarm per point beyond a limit, per lot out of specification, and per episode of a pattern
    // rule: a violation whose pattern reaches back to the previous one of its rule goes on that episode.
    const previousAt = new Map<string, number>();
    let episodes = 0;
    for (const v of chart.violations) {
      const key = `${v.rule}|${v.chart}`;
      const previous = previousAt.get(key);
      previousAt.set(key, v.index);
      if (v.rule === 'we1' || previous === undefined || v.points[0] > previous) episodes++;
    }
    const findings = episodes + chart.points.filter((p) => p.outOfSpec).length;
    // The falling-capability alarm is no finding of the chart: at most one per crossing, and only while the watch says below.
    const open = await db.execute<{ n: number; capability: number; below: boolean | null }>(sql`
      select count(*) filter (where rule <> 'capability')::int as n, count(*) filter (where rule = 'capability')::int as capability,
        (select below from capability_watch where characteristic_id = ${id}) as below
      from alarms where characteristic_id = ${id} and status = 'open'`);
    if (open.rows[0].n !== findings) problems.push(`characteristic ${id}: ${open.rows[0].n} open alarms for ${findings} findings`);
    if (open.rows[0].capability > (open.rows[0].below ? 1 : 0)) problems.push(`characteristic ${id}: ${open.rows[0].capability} open falling-capability alarms`);
    alarmCount += open.rows[0].n;
  }
  const doubled = await db.execute<{ n: number }>(sql`
    select count(*)::int as n from (select refs -> 'alarmIds' -> 0, user_id from mail_outbox where kind = 'alarm' group by 1, 2 having count(*) > 1) d`);
  if (doubled.rows[0].n) problems.push(`${doubled.rows[0].n} alarms e-mailed twice to one person`);
  const mails = await db.execute<{ n: number }>(sql`select count(*)::int as n from mail_outbox where kind = 'alarm'`);
  if (problems.length) throw new Error(problems.join('\n'));
  return { alarms: alarmCount, mails: mails.rows[0].n };
}
