// The nightly SPC run, the morning digest and the NCR action reminders of each plant, with node-cron
// in the plant's time zone. Several schedulers may share one database: the run's schedule key (plant and local date)
// and the digest's dedupe keys make the second one a no-op.
import cron, { type ScheduledTask } from 'node-cron';
import { asc } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { plants } from '@api/db/schema';
import { logger } from '@api/logger';
import { localDate, queueDigests } from '@api/mail/notify';
import type { SpcQueue } from '@api/spc/queue';
import { queueNcrReminders } from './ncr-reminders';
import { startRun } from '@api/spc/runs';

export interface PlantSchedule {
  id: number;
  code: string;
  timeZone: string;
  nightlyRunCron: string;
}

/** Starts the plant's nightly run once per local date, whoever asks first. */
export async function startNightlyRun(db: Database, queue: SpcQueue, plant: PlantSchedule, now = new Date()): Promise<number | null> {
  const runId = await startRun(db, queue, { trigger: 'schedule', plantId: plant.id, scheduleKey: `nightly:${plant.id}:${localDate(now, plant.timeZone)}` });
  logger.info({ plant: plant.code, runId }, runId ? 'nightly SPC run started' : 'nightly SPC run already started elsewhere');
  return runId;
}

export interface Scheduler {
  /** Re-reads the plants' schedules (a changed cron expression or time zone). */
  refresh(): Promise<void>;
  /** When each plant's next nightly run and digest are due. */
  nextRuns(): { plantId: number; nightlyRun: Date | null; digest: Date | null }[];
  stop(): void;
}

export function startScheduler(db: Database, queue: SpcQueue, opts: { digestCron: string; publicUrl: string; refreshMs?: number }): Scheduler {
  const tasks = new Map<number, { signature: string; run: ScheduledTask; digest: ScheduledTask; reminders: ScheduledTask }>();

  async function refresh() {
    const rows = await db.select({ id: plants.id, code: plants.code, timeZone: plants.timeZone, nightlyRunCron: plants.nightlyRunCron }).from(plants).orderBy(asc(plants.id));
    for (const plant of rows) {
      const signature = `${plant.nightlyRunCron}|${plant.timeZone}|${opts.digestCron}`;
      const existing = tasks.get(plant.id);
      if (existing?.signature === signature) continue;
      existing?.run.destroy();
      existing?.digest.destroy();
      existing?.reminders.destroy();
      if (!cron.validate(plant.nightlyRunCron)) {
        logger.error({ plant: plant.code, cron: plant.nightlyRunCron }, 'the plant has an invalid nightly run schedule; no nightly run');
        continue;
      }
      const run = cron.schedule(plant.nightlyRunCron, () => startNightlyRun(db, queue, plant).catch((err) => logger.error({ err: err.message }, 'nightly SPC run not started')), {
        timezone: plant.timeZone,
        name: `nightly-run-${plant.code}`,
        noOverlap: true,
      });
      const digest = cron.schedule(
        opts.digestCron,
        () =>
          queueDigests(db, { plantId: plant.id, timeZone: plant.timeZone, now: new Date(), publicUrl: opts.publicUrl })
            .then((n) => logger.info({ plant: plant.code, messages: n }, 'morning digest queued'))
            .catch((err) => logger.error({ err: err.message }, 'morning digest not queued')),
        { timezone: plant.timeZone, name: `digest-${plant.code}`, noOverlap: true },
      );
      // With the digest: the reminders of NCR actions due within two days or overdue, once per action and due date.
      const reminders = cron.schedule(
        opts.digestCron,
        () =>
          queueNcrReminders(db, { plantId: plant.id, timeZone: plant.timeZone, now: new Date(), publicUrl: opts.publicUrl })
            .then((n) => logger.info({ plant: plant.code, messages: n }, 'NCR action reminders queued'))
            .catch((err) => logger.error({ err: err.message }, 'NCR action reminders not queued')),
        { timezone: plant.timeZone, name: `ncr-reminders-${plant.code}`, noOverlap: true },
      );
      tasks.set(plant.id, { signature, run, digest, reminders });
    }
  }

  const initial = refresh().catch((err) => logger.error({ err: err.message }, 'schedules not read'));
  const timer = setInterval(() => void refresh().catch((err) => logger.warn({ err: err.message }, 'schedules not refreshed')), opts.refreshMs ?? 10 * 60_000);
  timer.unref();
  return {
    refresh: async () => {
      await initial;
      await refresh();
    },
    nextRuns: () => [...tasks].map(([plantId, t]) => ({ plantId, nightlyRun: t.run.getNextRun(), digest: t.digest.getNextRun() })),
    stop() {
      clearInterval(timer);
      for (const t of tasks.values()) {
        t.run.destroy();
        t.digest.destroy();
        t.reminders.destroy();
      }
      tasks.clear();
    },
  };
}
