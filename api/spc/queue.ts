// The PostgreSQL-backed job queue (pg-boss 10) that spreads a run's characteristics over workers.
// One job per characteristic; the queue's singleton policy lets only one job of a singleton key
// (the characteristic) be active at a time, so two runs of one characteristic never overlap.
import { hostname } from 'node:os';
import PgBoss from 'pg-boss';
import type pg from 'pg';
import { logger } from '../logger';

export const CHARACTERISTIC_QUEUE = 'spc-characteristic';

export interface JobSettings {
  retryLimit: number;
  retryDelaySeconds: number;
  expireSeconds: number;
}

const intEnv = (name: string, fallback: number, env: NodeJS.ProcessEnv) => {
  const raw = env[name];
  const n = raw === undefined || raw === '' ? fallback : Number(raw);
  if (!Number.isInteger(n) || n < 0) throw new Error(`${name} must be a whole number, got ${raw}`);
  return n;
};

/** Retries with exponential backoff; an active job not finished within expireSeconds (a dead worker) is failed and retried. */
export function jobSettings(env: NodeJS.ProcessEnv = process.env): JobSettings {
  return {
    retryLimit: intEnv('SPC_JOB_RETRY_LIMIT', 3, env),
    retryDelaySeconds: Math.max(1, intEnv('SPC_JOB_RETRY_DELAY_SECONDS', 5, env)),
    expireSeconds: Math.max(1, intEnv('SPC_JOB_EXPIRE_SECONDS', 600, env)),
  };
}

export const workerName = () => `${hostname()}:${process.pid}`;

export interface StartBossOptions {
  /** A pool of the app to share, or a connection string for a queue with its own pool. */
  pool?: pg.Pool;
  connectionString?: string;
  /** Maintenance (expiring jobs of dead workers, archiving) runs in worker processes. */
  supervise: boolean;
  env?: NodeJS.ProcessEnv;
}

/** Starts pg-boss (creating its schema on first use) and the characteristic queue. */
export async function startBoss(opts: StartBossOptions): Promise<PgBoss> {
  const env = opts.env ?? process.env;
  const base = opts.pool
    ? { db: { executeSql: (text: string, values: unknown[]) => opts.pool!.query(text, values as unknown[]) } }
    : { connectionString: opts.connectionString, max: 4 };
  const boss = new PgBoss({
    ...base,
    application_name: 'prismline-queue',
    supervise: opts.supervise,
    schedule: false,
    migrate: true,
    maintenanceIntervalSeconds: intEnv('PGBOSS_MAINTENANCE_SECONDS', 30, env) || 30,
  });
  boss.on('error', (err: Error) => logger.warn({ err: err.message }, 'job queue error'));
  await boss.start();
  try {
    await boss.createQueue(CHARACTERISTIC_QUEUE, { name: CHARACTERISTIC_QUEUE, policy: 'singleton' });
  } catch (err) {
    // Two processes starting at once may race to create it; the queue exists either way.
    if (!(await boss.getQueue(CHARACTERISTIC_QUEUE))) throw err;
  }
  return boss;
}

/** The queue as the API sees it: started on first use, on the app's own pool. */
export interface SpcQueue {
  boss(): Promise<PgBoss>;
  stop(): Promise<void>;
}

export function lazyQueue(pool: pg.Pool): SpcQueue {
  let started: Promise<PgBoss> | null = null;
  return {
    boss() {
      started ??= startBoss({ pool, supervise: false }).catch((err) => {
        started = null;
        throw err;
      });
      return started;
    },
    async stop() {
      if (started) await (await started).stop({ graceful: false, close: false }).catch(() => undefined);
    },
  };
}

export function fixedQueue(boss: PgBoss): SpcQueue {
  return { boss: async () => boss, stop: async () => undefined };
}
