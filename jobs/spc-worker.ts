// Workers of the characteristic queue. Each loop takes one job at a time, so that one slow or
// failing characteristic never holds others back, and asks for the next one at once when it is
// done (pg-boss's own work() pauses a polling interval after every batch).
import type PgBoss from 'pg-boss';
import type { Database } from '@api/db/client';
import { logger } from '@api/logger';
import { CHARACTERISTIC_QUEUE } from '@api/spc/queue';
import { recordFailedAttempt, runCharacteristic } from '@api/spc/run';
import type { CharacteristicJob } from '@api/spc/runs';
import { sweepRuns } from '@api/spc/runs';

export interface SpcWorkerOptions {
  concurrency: number;
  pollMs: number;
  worker: string;
  publicUrl: string;
  pauseMs?: number;
  /** How often to look for items whose job failed while no worker was there to say so. */
  sweepMs?: number;
}

export interface SpcWorkers {
  stop(): Promise<void>;
}

/** The workers' settings from the environment (listed in jobs/worker.ts), read by the server and by npm run worker alike. */
export function workerSettings(env: NodeJS.ProcessEnv = process.env) {
  const concurrency = Number(env.SPC_WORKER_CONCURRENCY ?? 2);
  const pollMs = Number(env.SPC_POLL_MS ?? 500);
  const pauseMs = Number(env.SPC_TEST_PAUSE_MS ?? 0);
  return {
    concurrency: Number.isInteger(concurrency) && concurrency >= 0 ? concurrency : 2,
    pollMs: Number.isFinite(pollMs) && pollMs >= 20 ? pollMs : 500,
    pauseMs: Number.isFinite(pauseMs) && pauseMs > 0 ? pauseMs : undefined,
    sweepMs: Number(env.SPC_SWEEP_MS ?? 10_000),
  };
}

const sleep = (ms: number, signal: AbortSignal) =>
  new Promise<void>((resolve) => {
    const done = () => {
      clearTimeout(t);
      signal.removeEventListener('abort', done);
      resolve();
    };
    const t = setTimeout(done, ms);
    signal.addEventListener('abort', done, { once: true });
  });

export function startSpcWorkers(boss: PgBoss, db: Database, opts: SpcWorkerOptions): SpcWorkers {
  const stopping = new AbortController();

  async function handle(job: PgBoss.JobWithMetadata<CharacteristicJob>): Promise<void> {
    const { runId, characteristicId } = job.data;
    try {
      const outcome = await runCharacteristic(db, { runId, characteristicId, worker: opts.worker, publicUrl: opts.publicUrl, pauseMs: opts.pauseMs });
      await boss.complete(CHARACTERISTIC_QUEUE, job.id, { ...outcome });
    } catch (err) {
      // drizzle wraps the database's own words in `cause`; those are the ones worth showing.
      const e = err as Error & { cause?: Error };
      const message = e.cause?.message ? `${e.cause.message} (${e.message.split('\n')[0]})` : e.message || String(err);
      const final = job.retryCount >= job.retryLimit;
      logger.warn({ runId, characteristicId, attempt: job.retryCount + 1, final, err: message }, 'characteristic job failed');
      await recordFailedAttempt(db, { runId, characteristicId, error: message, final, publicUrl: opts.publicUrl }).catch((e) => logger.warn({ err: (e as Error).message }, 'could not record the failed attempt'));
      await boss.fail(CHARACTERISTIC_QUEUE, job.id, { message }).catch((e) => logger.warn({ err: (e as Error).message }, 'could not fail the job; it will expire and be retried'));
    }
  }

  async function loop(): Promise<void> {
    while (!stopping.signal.aborted) {
      // fetch() answers [] when the database is away; the loop then waits and asks again.
      const jobs = await boss.fetch<CharacteristicJob>(CHARACTERISTIC_QUEUE, { batchSize: 1, includeMetadata: true }).catch(() => []);
      if (!jobs.length) {
        await sleep(opts.pollMs, stopping.signal);
        continue;
      }
      await handle(jobs[0]);
    }
  }

  async function sweep(): Promise<void> {
    while (!stopping.signal.aborted) {
      await sleep(opts.sweepMs ?? 10_000, stopping.signal);
      if (stopping.signal.aborted) break;
      await sweepRuns(db).catch((err) => logger.warn({ err: (err as Error).message }, 'run sweep failed'));
    }
  }

  const loops = [...Array.from({ length: opts.concurrency }, loop), sweep()];
  return {
    async stop() {
      stopping.abort();
      await Promise.all(loops);
    },
  };
}
