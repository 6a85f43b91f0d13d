// The audit trail takes only the entity and action pairs of audit-actions.ts; a misspelt or misplaced
// action is a type error (checked by `tsc --noEmit`, which npm test runs), and a batch is one insert.
import { afterAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { databaseUrl } from '@tests/support/api';
import { createDatabase } from './client';
import { auditEvents } from './schema';
import { recordAudit, type AuditEntry } from './audit';
import { auditActions } from './audit-actions';

const db = createDatabase(databaseUrl(), 1);
afterAll(() => db.$client.end());

describe('audit entries', () => {
  it('accept only actions listed for their entity', () => {
    const ok: AuditEntry = { actorId: null, entity: 'alarm', action: 'close-automatically', entityId: 1 };
    // @ts-expect-error: a misspelt action
    const misspelt: AuditEntry = { actorId: null, entity: 'alarm', action: 'closed', entityId: 1 };
    // @ts-expect-error: an action of another entity
    const misplaced: AuditEntry = { actorId: null, entity: 'measurement', action: 'void', entityId: 1 };
    // @ts-expect-error: an entity not in the list
    const unknown: AuditEntry = { actorId: null, entity: 'alarms', action: 'close', entityId: 1 };
    expect([ok, misspelt, misplaced, unknown].map((e) => (auditActions[e.entity] as readonly string[] | undefined)?.includes(e.action) ?? false)).toEqual([true, false, false, false]);
  });

  it('are written in the transaction of the change, several at once, and vanish with it when it rolls back', async () => {
    const reason = `audit test ${process.pid} ${Date.now()}`;
    const entries: AuditEntry[] = [1, 2].map((id) => ({ actorId: null, entity: 'alarm', action: 'close-automatically', entityId: -id, reason }));
    await db
      .transaction(async (tx) => {
        await recordAudit(tx, entries);
        expect(await tx.select().from(auditEvents).where(eq(auditEvents.reason, reason))).toHaveLength(2);
        tx.rollback();
      })
      .catch(() => undefined);
    expect(await db.select().from(auditEvents).where(eq(auditEvents.reason, reason))).toEqual([]);
  });
});
