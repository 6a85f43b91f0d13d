// The audit trail's chain against the real database: sealed at commit in one unbroken line, append-only
// by trigger, and a change made past the trigger (by the table's owner) found by the verify pass.
// The hash is SHA-256 (FIPS 180-4); the expected digest below is recomputed with Node's crypto, not the database.
import { createHash } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { databaseUrl } from '@tests/support/api';
import { createDatabase } from './client';
import { recordAudit } from './audit';
import { verifyAuditChain } from './audit-chain';

const db = createDatabase(databaseUrl(), 12);
afterAll(() => db.$client.end());

const rolledBack = new Error('rolled back');
/** Runs `fn` in a transaction that always rolls back, and answers what it returned. */
async function inRolledBack<T>(fn: (tx: Parameters<Parameters<typeof db.transaction>[0]>[0]) => Promise<T>): Promise<T> {
  let result: T | undefined;
  await db
    .transaction(async (tx) => {
      result = await fn(tx);
      throw rolledBack;
    })
    .catch((e: unknown) => {
      if (e !== rolledBack) throw e;
    });
  return result as T;
}

const mark = () => `chain test ${process.pid} ${Date.now()} ${Math.random()}`;

describe('the audit chain', () => {
  it('seals every committed event at commit, each naming the hash of the one before', async () => {
    const reason = mark();
    await db.transaction((tx) => recordAudit(tx, [1, 2, 3].map((i) => ({ actorId: null, entity: 'alarm', action: 'comment', entityId: -i, after: { n: i, text: 'é "quoted"' }, reason }) as const)));
    const rows = (
      await db.execute<{ seq: string; prev_hash: string; hash: string; at: string; entity_id: string; before_hash: string }>(sql`
        select e.seq, e.prev_hash, e.hash, to_char(e.at at time zone 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.US"Z"') as at, e.entity_id, (select hash from audit_events p where p.seq = e.seq - 1) as before_hash
        from audit_events e where reason = ${reason} order by seq`)
    ).rows;
    expect(rows).toHaveLength(3);
    for (const r of rows) {
      expect(r.prev_hash).toBe(r.before_hash);
      // Recomputed outside the database from the documented canonical form (jsonb's text of the array).
      expect(r.at).toMatch(/^\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{6}Z$/);
      const canonical = `["${r.prev_hash}", ${r.seq}, "${r.at}", null, "comment", "alarm", "${r.entity_id}", null, {"n": ${-Number(r.entity_id)}, "text": "é \\"quoted\\""}, "${reason}"]`;
      expect(r.hash).toBe(createHash('sha256').update(canonical, 'utf8').digest('hex'));
    }
    expect(Number(rows[1].seq)).toBe(Number(rows[0].seq) + 1);
  });

  it('gives ten concurrent writers ten consecutive links and stays intact', async () => {
    const reason = mark();
    await Promise.all(Array.from({ length: 10 }, (_, i) => db.transaction((tx) => recordAudit(tx, { actorId: null, entity: 'alarm', action: 'comment', entityId: -100 - i, reason }))));
    const seqs = (await db.execute<{ seq: string }>(sql`select seq from audit_events where reason = ${reason} order by seq`)).rows.map((r) => Number(r.seq));
    expect(seqs).toHaveLength(10);
    const verdict = await verifyAuditChain(db);
    expect(verdict.firstBroken).toBeNull();
    expect(verdict.intact).toBe(true);
    expect(verdict.head!.seq).toBeGreaterThanOrEqual(seqs[9]);
  });

  it('does not let an insert bring its own place or hash', async () => {
    const reason = mark();
    await db.transaction((tx) => tx.execute(sql`insert into audit_events (action, entity, reason, seq, prev_hash, hash) values ('comment', 'alarm', ${reason}, 1, 'forged', 'forged')`));
    const [row] = (await db.execute<{ seq: string; hash: string }>(sql`select seq, hash from audit_events where reason = ${reason}`)).rows;
    expect(Number(row.seq)).toBeGreaterThan(1);
    expect(row.hash).toMatch(/^[0-9a-f]{64}$/);
  });

  it.each([
    ['UPDATE', sql`update audit_events set reason = 'rewritten' where seq = 1`],
    ['DELETE', sql`delete from audit_events where seq = 1`],
    ['TRUNCATE', sql`truncate audit_events`],
  ])('refuses %s in the database', async (verb, statement) => {
    const refusal = await inRolledBack((tx) => tx.execute(statement).then(() => null, (e: unknown) => e as Error & { cause?: { code?: string; message?: string } }));
    expect(refusal).not.toBeNull();
    const pgError = refusal!.cause ?? refusal!;
    expect((pgError as { code?: string }).code).toBe('42501');
    expect(String((pgError as Error).message)).toContain(`append-only: ${verb}`);
  });

  it('finds a row changed with the guard disabled, naming the link', async () => {
    const verdict = await inRolledBack(async (tx) => {
      await tx.execute(sql`alter table audit_events disable trigger audit_events_append_only`);
      await tx.execute(sql`update audit_events set reason = coalesce(reason, '') || ' (edited)' where seq = 2`);
      return verifyAuditChain(tx);
    });
    expect(verdict.intact).toBe(false);
    expect(verdict.firstBroken).toMatchObject({ seq: 2, problem: 'content-changed' });
    expect(verdict.firstBroken!.message).toMatch(/Link 2 .*changed after it was written/);
  });

  it('finds a deleted row and a rewritten link', async () => {
    const deleted = await inRolledBack(async (tx) => {
      await tx.execute(sql`alter table audit_events disable trigger audit_events_append_only`);
      await tx.execute(sql`delete from audit_events where seq = 3`);
      return verifyAuditChain(tx);
    });
    expect(deleted.firstBroken).toMatchObject({ seq: 4, problem: 'event-missing' });
    const relinked = await inRolledBack(async (tx) => {
      await tx.execute(sql`alter table audit_events disable trigger audit_events_append_only`);
      await tx.execute(sql`update audit_events set prev_hash = repeat('f', 64) where seq = 3`);
      return verifyAuditChain(tx);
    });
    expect(relinked.firstBroken).toMatchObject({ seq: 3, problem: 'link-broken' });
    // Rolled back: the trail is whole again.
    expect((await verifyAuditChain(db)).intact).toBe(true);
  });
});
