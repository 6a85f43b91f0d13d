import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import type PgBoss from 'pg-boss';
import { startPrivateCluster, type PrivateCluster } from '@tests/support/private-cluster';
import { seedScaledPlant, type ScaledPlant } from '@tests/support/scaled-plant';
import { fixedQueue, startBoss } from '@api/spc/queue';
import { startNightlyRun, startScheduler } from './scheduler';

let cluster: PrivateCluster;
let boss: PgBoss;
let plant: ScaledPlant;
beforeAll(async () => {
  cluster = await startPrivateCluster('schedule');
  plant = await seedScaledPlant(cluster.db, { characteristics: 3, points: 5 });
  boss = await startBoss({ connectionString: cluster.databaseUrl, supervise: false });
});
afterAll(async () => {
  await boss?.stop({ graceful: false }).catch(() => undefined);
  await cluster?.destroy();
});

/** Wall-clock time of an instant in a zone, read through Intl (IANA time zone database). */
const localTime = (d: Date, timeZone: string) => new Intl.DateTimeFormat('en-GB', { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }).format(d);

describe('nightly schedule', () => {
  it('fires at 02:00 in the plant’s time zone by default and follows a changed schedule', async () => {
    const scheduler = startScheduler(cluster.db, fixedQueue(boss), { digestCron: '0 6 * * *', publicUrl: 'http://prismline.test' });
    try {
      await scheduler.refresh();
      const [next] = scheduler.nextRuns().filter((n) => n.plantId === plant.plantId);
      expect(localTime(next.nightlyRun!, 'Europe/London')).toBe('02:00');
      expect(localTime(next.digest!, 'Europe/London')).toBe('06:00');
      expect(next.nightlyRun!.getTime()).toBeGreaterThan(Date.now());
      expect(next.nightlyRun!.getTime() - Date.now()).toBeLessThanOrEqual(25 * 3600_000);

      await cluster.db.execute(sql`update plants set nightly_run_cron = '30 3 * * *', time_zone = 'Europe/Berlin' where id = ${plant.plantId}`);
      await scheduler.refresh();
      const [moved] = scheduler.nextRuns().filter((n) => n.plantId === plant.plantId);
      expect(localTime(moved.nightlyRun!, 'Europe/Berlin')).toBe('03:30');
    } finally {
      scheduler.stop();
    }
  });

  it('starts one nightly run per plant and local date, however many schedulers ask, with one job per characteristic', async () => {
    const queue = fixedQueue(boss);
    const p = { id: plant.plantId, code: 'SCALE', timeZone: 'Europe/London', nightlyRunCron: '0 2 * * *' };
    const at = new Date('2026-03-29T01:30:00Z'); // the night UK clocks go forward (last Sunday of March, from memory): 02:30 local
    const first = await startNightlyRun(cluster.db, queue, p, at);
    const second = await startNightlyRun(cluster.db, queue, p, new Date('2026-03-29T22:00:00Z'));
    expect(first).not.toBeNull();
    expect(second).toBeNull();
    const next = await startNightlyRun(cluster.db, queue, p, new Date('2026-03-30T01:00:00Z'));
    expect(next).not.toBeNull();
    const runs = await cluster.db.execute<{ schedule_key: string; kind: string; characteristics: number }>(sql`select schedule_key, kind, characteristics from spc_runs order by id`);
    expect(runs.rows).toEqual([
      { schedule_key: `nightly:${plant.plantId}:2026-03-29`, kind: 'full', characteristics: 3 },
      { schedule_key: `nightly:${plant.plantId}:2026-03-30`, kind: 'full', characteristics: 3 },
    ]);
    const jobs = await cluster.db.execute<{ singleton_key: string; n: number }>(sql`select singleton_key, count(*)::int as n from pgboss.job where name = 'spc-characteristic' group by 1 order by 1`);
    expect(jobs.rows).toEqual(plant.characteristicIds.map(String).sort().map((k) => ({ singleton_key: k, n: 2 })));
  });
});
