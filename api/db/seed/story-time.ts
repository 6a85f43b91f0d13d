// The demo's decisions go through the app's own paths (freezeLimits, excludePoint, triageAlarm,
// recordAudit), which stamp them with the moment the seed runs. A person reading the history should
// see them when the story has them happen: these helpers move what one decision wrote to that moment.
import { sql } from 'drizzle-orm';
import type { Database } from '../client';

type Executor = Pick<Database, 'execute'>;

/**
 * Runs one decision and dates the audit-trail rows it wrote at `at`. Nothing else writes to the
 * audit trail while the demo is seeded (the server starts its workers afterwards), so the rows after
 * the newest one before the call are the decision's own.
 */
export async function decidedAt<T>(db: Executor, at: Date, decide: () => Promise<T>): Promise<T> {
  const before = (await db.execute<{ id: number }>(sql`select coalesce(max(id), 0)::int as id from audit_events`)).rows[0].id;
  const result = await decide();
  await db.execute(sql`update audit_events set at = ${at} where id > ${before}`);
  return result;
}
