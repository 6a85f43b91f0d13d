import { drizzle } from 'drizzle-orm/node-postgres';
import { migrate } from 'drizzle-orm/node-postgres/migrator';
import type pg from 'pg';
import { migrationsFolder } from '../paths';

/** Arbitrary constant that names the migration lock among advisory locks. */
const MIGRATION_LOCK = 727_001;

export interface MigrationOutcome {
  /** Migrations applied by this call. */
  applied: number;
  /** Migrations the database holds now. */
  total: number;
}

/** Migrations recorded in drizzle's own table (absent before the first migration). */
async function recorded(client: pg.PoolClient): Promise<number> {
  const { rows } = await client.query<{ exists: boolean }>(`select to_regclass('drizzle.__drizzle_migrations') is not null as exists`);
  if (!rows[0].exists) return 0;
  return (await client.query<{ n: number }>('select count(*)::int as n from drizzle.__drizzle_migrations')).rows[0].n;
}

/** Applies the committed migrations; an advisory lock keeps two starting processes from racing. */
export async function migrateDatabase(pool: pg.Pool): Promise<MigrationOutcome> {
  const client = await pool.connect();
  try {
    await client.query('select pg_advisory_lock($1)', [MIGRATION_LOCK]);
    const before = await recorded(client);
    await migrate(drizzle(client), { migrationsFolder });
    const total = await recorded(client);
    return { applied: total - before, total };
  } finally {
    await client.query('select pg_advisory_unlock($1)', [MIGRATION_LOCK]).catch(() => undefined);
    client.release();
  }
}
