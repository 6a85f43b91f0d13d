import { drizzle, type NodePgDatabase } from 'drizzle-orm/node-postgres';
import pg from 'pg';
import { logger } from '../logger';
import * as schema from './schema';

export type Database = NodePgDatabase<typeof schema> & { $client: pg.Pool };

export function createPool(databaseUrl: string, max = 10): pg.Pool {
  const pool = new pg.Pool({ connectionString: databaseUrl, max, connectionTimeoutMillis: 3000, idleTimeoutMillis: 30_000 });
  // An idle client loses its connection when PostgreSQL restarts; without a listener that would crash the process.
  pool.on('error', (err) => logger.warn({ err: err.message }, 'idle database connection lost'));
  // A client that loses its connection while checked out (a transaction when PostgreSQL restarts) emits
  // 'error' too; unheard, that ends the process. The failed statement still rejects, so callers see it.
  pool.on('connect', (client) => {
    client.on('error', (err) => logger.warn({ err: err.message }, 'database connection lost during use'));
  });
  return pool;
}

export function createDatabase(databaseUrl: string, max?: number): Database {
  return drizzle(createPool(databaseUrl, max), { schema }) as Database;
}
