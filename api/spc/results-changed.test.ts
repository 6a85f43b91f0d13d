import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { createApp } from '../app';
import { createDatabase } from '../db/client';
import { alarms, spcRuns } from '../db/schema';
import { DEMO_PASSWORD } from '../db/seed';
import { databaseUrl, demoEmail, TEST_JWT_SECRET } from '@tests/support/api';
import { resultsChanged } from './results-changed';
import { createTestCharacteristic, removeTestCharacteristics } from '@tests/support/plant';

const db = createDatabase(databaseUrl(), 2);
afterAll(async () => {
  await removeTestCharacteristics(db);
  await db.$client.end();
});

describe('what follows a change of results', () => {
  it('never fail an upload: with the queue unreachable the upload is stored (201) and its out-of-spec alarm raised all the same', async () => {
    const brokenQueue = { boss: () => Promise.reject(new Error('queue unreachable')), stop: async () => undefined };
    const app = createApp({
      db,
      config: { jwtSecret: TEST_JWT_SECRET, loginAttemptsPer15Min: 50 },
      serveWeb: false,
      resultsChanged: (change) => resultsChanged({ db, queue: brokenQueue, publicUrl: 'http://prismline.test' }, change),
      spcQueue: brokenQueue,
    });
    const login = await request(app).post('/api/v1/auth/login').send({ email: demoEmail.technician, password: DEMO_PASSWORD });
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2, specs: [{ lsl: 135, usl: 155, effectiveFrom: '2025-01-01T00:00:00Z' }] });
    const csv = `lot,product,line,produced_at,characteristic,value,replicate\n${t.lotNumber('H1')},${t.productCode},L1,2025-11-03T06:00:00Z,${t.code},160,1\n${t.lotNumber('H1')},${t.productCode},L1,2025-11-03T06:00:00Z,${t.code},161,2\n`;
    const res = await request(app).post('/api/v1/uploads').set({ authorization: `Bearer ${login.body.token}` }).attach('file', Buffer.from(csv), 'shift.csv');
    expect(res.status).toBe(201);
    const [alarm] = await db.select().from(alarms).where(and(eq(alarms.characteristicId, t.characteristicId), eq(alarms.rule, 'out-of-spec')));
    expect(alarm).toMatchObject({ limitName: 'USL', limitValue: 155, statistic: 160.5 });
    const runs = await db.select().from(spcRuns).where(sql`${spcRuns.id} in (select run_id from spc_run_items where characteristic_id = ${t.characteristicId})`);
    expect(runs).toEqual([]);
    // Starting a run by hand reports the failure instead of pretending.
    const manager = await request(app).post('/api/v1/auth/login').send({ email: demoEmail.quality_manager, password: DEMO_PASSWORD });
    const start = await request(app).post('/api/v1/spc-runs').set({ authorization: `Bearer ${manager.body.token}` }).send({});
    expect(start.status).toBe(503);
    expect(start.body.error).toMatch(/queue cannot be reached/);
  });
});
