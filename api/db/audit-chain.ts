// The audit trail's chain (migration 0016): checking it, and the one way the demo seed dates its story.
import { sql } from 'drizzle-orm';
import type { AuditChainVerdict } from '@shared/schemas/audit-events';
import type { Database } from './client';

type Executor = Pick<Database, 'execute'>;

const GENESIS = '0'.repeat(64);

/**
 * Recomputes every row's hash from its content and the row before it, in chain order, and names the
 * first link that does not hold: a changed row, a broken link, a deleted row (a gap in seq) or a row
 * that was never sealed. One pass in the database; a million rows take seconds.
 */
export async function verifyAuditChain(db: Executor, now = new Date()): Promise<AuditChainVerdict> {
  const summary = (
    await db.execute<{ events: number; unsealed_id: number | null; head_seq: number | null; head_id: number | null; head_hash: string | null; head_at: Date | null }>(sql`
      select (select count(*)::int from audit_events) as events,
             (select min(id) from audit_events where seq is null) as unsealed_id,
             h.seq::int as head_seq, h.id as head_id, h.hash as head_hash, h.at as head_at
      from (select 1) one left join lateral (select seq, id, hash, at from audit_events where seq is not null order by seq desc limit 1) h on true`)
  ).rows[0];
  const broken = (
    await db.execute<{ seq: number; id: number; problem: 'content-changed' | 'link-broken' | 'event-missing' }>(sql`
      select seq::int, id,
             case when seq <> coalesce(before_seq, 0) + 1 then 'event-missing'
                  when prev_hash is distinct from coalesce(before_hash, ${GENESIS}) then 'link-broken'
                  else 'content-changed' end as problem
      from (
        select id, seq, prev_hash, hash,
               audit_event_hash(prev_hash, seq, at, actor_id, action, entity, entity_id, before, after, reason) as recomputed,
               lag(hash) over (order by seq) as before_hash,
               lag(seq) over (order by seq) as before_seq
        from audit_events where seq is not null
      ) chain
      where hash is distinct from recomputed or prev_hash is distinct from coalesce(before_hash, ${GENESIS}) or seq <> coalesce(before_seq, 0) + 1
      order by seq limit 1`)
  ).rows[0];
  const firstBroken: AuditChainVerdict['firstBroken'] = broken
    ? {
        seq: broken.seq,
        eventId: broken.id,
        problem: broken.problem,
        message:
          broken.problem === 'event-missing'
            ? `Link ${broken.seq} (event ${broken.id}): the event before it in the chain is missing — a row was deleted`
            : broken.problem === 'link-broken'
              ? `Link ${broken.seq} (event ${broken.id}): it does not name the hash of the event before it`
              : `Link ${broken.seq} (event ${broken.id}): its content no longer gives its hash — it was changed after it was written`,
      }
    : summary.unsealed_id !== null
      ? { seq: null, eventId: summary.unsealed_id, problem: 'unsealed', message: `Event ${summary.unsealed_id} has no place in the chain: it was written past the sealing trigger` }
      : null;
  return {
    intact: firstBroken === null,
    events: summary.events,
    head:
      summary.head_seq === null
        ? null
        : { seq: summary.head_seq, eventId: summary.head_id!, hash: summary.head_hash!, at: new Date(summary.head_at!).toISOString() },
    firstBroken,
    checkedAt: now.toISOString(),
  };
}

/**
 * Runs the demo seed's story with the append-only guard lifted, then re-seals the whole chain, so the
 * story's decisions can be dated when the story has them happen (story-time.ts). Needs the table's owner;
 * the guard is back on however the story ends. Never used outside the demo seed.
 */
export async function withStoryDating<T>(db: Executor, story: () => Promise<T>): Promise<T> {
  await db.execute(sql`alter table audit_events disable trigger audit_events_append_only`);
  try {
    return await story();
  } finally {
    await db.execute(sql`select audit_events_reseal()`);
    await db.execute(sql`alter table audit_events enable trigger audit_events_append_only`);
  }
}
