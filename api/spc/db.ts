import { sql } from 'drizzle-orm';
import type pg from 'pg';
import type { Database } from '../db/client';
import { logger } from '../logger';

export type Tx = Parameters<Parameters<Database['transaction']>[0]>[0];
/** The pool or an open transaction: the chart is read the same way inside a run's transaction. */
export type Executor = Database | Tx;

/** One array parameter: drizzle would spread a bare JS array into a list of parameters. */
export const arr = (values: unknown[]) => sql.param(values);

/**
 * pg emits 'error' on a client that loses its connection while it is checked out (a transaction
 * between two statements when PostgreSQL restarts); the pool only listens on idle clients, and an
 * unheard 'error' ends the process. The failed statement still rejects, so the job is retried.
 */
export function survivePostgresRestarts(pool: pg.Pool): void {
  pool.on('connect', (client) => {
    client.on('error', (err) => logger.warn({ err: err.message }, 'database connection lost during use'));
  });
}
