// Starting a run writes the run, its items, its queue jobs and, for a run someone started, its audit
// row in one transaction: when the queue refuses the jobs, none of them remains.
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { createDatabase } from '../db/client';
import { auditEvents, spcRunItems } from '../db/schema';
import { databaseUrl } from '@tests/support/api';
import type { SpcQueue } from './queue';
import { startRun } from './runs';
import { createTestCharacteristic, removeTestCharacteristics, userIdByEmail } from '@tests/support/plant';

const db = createDatabase(databaseUrl(), 2);
afterAll(async () => {
  await removeTestCharacteristics(db);
  await db.$client.end();
});

/** A queue whose job insert fails, as when pg-boss's tables cannot be written. */
const refusingQueue: SpcQueue = {
  boss: async () => ({ insert: async () => Promise.reject(new Error('queue unavailable')) }) as never,
  stop: async () => undefined,
};

describe('startRun', () => {
  it('leaves no run, no item and no audit row behind when the queue refuses the jobs', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'imr', subgroupSize: 1 });
    const manager = await userIdByEmail(db, 'manager@harrowvale.example');
    await expect(startRun(db, refusingQueue, { trigger: 'manual', characteristicIds: [t.characteristicId], requestedBy: manager })).rejects.toThrow('queue unavailable');
    expect(await db.select().from(spcRunItems).where(eq(spcRunItems.characteristicId, t.characteristicId))).toEqual([]);
    const audit = await db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.entity, 'spc run'), sql`${auditEvents.after} -> 'characteristicIds' = ${JSON.stringify([t.characteristicId])}::jsonb`));
    expect(audit).toEqual([]);
  });
});
