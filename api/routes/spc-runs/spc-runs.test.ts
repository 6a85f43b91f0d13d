import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { auditEvents, lots, spcRunItems, spcSnapshots } from '@api/db/schema';
import { createSpcTestApi } from '@tests/support/spc-api';
import { createTestCharacteristic, removeTestCharacteristics, userIdByEmail } from '@tests/support/plant';

const api = createSpcTestApi();
afterAll(async () => {
  await removeTestCharacteristics(api.db);
  await api.close();
});
const day = (d: number) => new Date(Date.UTC(2025, 4, 1 + d, 6)).toISOString();

describe('POST /api/v1/spc-runs', () => {
  it('lets quality managers and admins start a run (202 {id}), not technicians or auditors', async () => {
    for (const role of ['technician', 'auditor'] as const) {
      const res = await request(api.app).post('/api/v1/spc-runs').set(await api.as(role)).send({});
      expect(res.status).toBe(403);
    }
    const t = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2 });
    await t.addLot('A', day(1), [145, 146]);
    const res = await request(api.app).post('/api/v1/spc-runs').set(await api.as('quality_manager')).send({ characteristicIds: [t.characteristicId] });
    expect(res.status).toBe(202);
    expect(Object.keys(res.body)).toEqual(['id']);
    const [audit] = await api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'spc run'), eq(auditEvents.entityId, String(res.body.id))));
    expect(audit.action).toBe('start');
    expect(audit).toMatchObject({ actorId: await userIdByEmail(api.db, 'manager@harrowvale.example'), after: { characteristicIds: [t.characteristicId] } });
  });

  it('reports progress with the agreed fields and ends succeeded with every characteristic done', async () => {
    const a = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2 });
    const b = await createTestCharacteristic(api.db, { chartType: 'imr', subgroupSize: 1 });
    for (let i = 0; i < 5; i++) {
      await a.addLot(`P${i}`, day(i), [145 + i, 146]);
      await b.addLot(`P${i}`, day(i), [145 + i]);
    }
    const start = await request(api.app).post('/api/v1/spc-runs').set(await api.as('admin')).send({ characteristicIds: [a.characteristicId, b.characteristicId] });
    const first = await request(api.app).get(`/api/v1/spc-runs/${start.body.id}`).set(await api.as('technician'));
    expect(first.status).toBe(200);
    for (const key of ['id', 'status', 'characteristics', 'done', 'failed', 'alarmsRaised', 'startedAt', 'finishedAt']) expect(first.body).toHaveProperty(key);
    expect(['queued', 'running', 'succeeded']).toContain(first.body.status);
    expect(first.body.characteristics).toBe(2);

    const done = await api.waitForRun(start.body.id);
    expect(done).toMatchObject({ id: start.body.id, status: 'succeeded', characteristics: 2, done: 2, failed: 0, failures: [] });
    expect(Date.parse(done.finishedAt)).toBeGreaterThanOrEqual(Date.parse(done.startedAt));
    const snaps = await api.db.select({ id: spcSnapshots.characteristicId, n: spcSnapshots.pointCount }).from(spcSnapshots).where(sql`${spcSnapshots.characteristicId} in (${a.characteristicId}, ${b.characteristicId})`);
    expect(snaps.map((s) => s.n)).toEqual([5, 5]);

    const list = await request(api.app).get('/api/v1/spc-runs').set(await api.as('auditor'));
    expect(list.body.items.find((r: { id: number }) => r.id === start.body.id)).toMatchObject({ status: 'succeeded', done: 2, kind: 'incremental', trigger: 'manual', requestedBy: 'Demo Administrator' });
  });

  it('retries a failing characteristic, then shows it failed with the reason while the others succeed', async () => {
    const good = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2 });
    const bad = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2 });
    await good.addLot('G1', day(1), [145, 146]);
    await bad.addLot('B1', day(1), [145, 146]);
    // A value no instrument produces, written past the ingest checks: the engine refuses it.
    const [lot] = await api.db.select({ id: lots.id }).from(lots).where(eq(lots.lotNumber, bad.lotNumber('B1')));
    await api.db.execute(sql`update measurements set value = 'NaN' where lot_id = ${lot.id} and replicate = 2`);
    const start = await request(api.app).post('/api/v1/spc-runs').set(await api.as('quality_manager')).send({ characteristicIds: [good.characteristicId, bad.characteristicId] });
    const done = await api.waitForRun(start.body.id, 30_000);
    expect(done).toMatchObject({ status: 'failed', characteristics: 2, done: 1, failed: 1 });
    expect(done.failures).toEqual([{ characteristicId: bad.characteristicId, characteristicCode: bad.code, attempts: 2, error: expect.stringMatching(/finite number/) }]);
    const items = await api.db.select().from(spcRunItems).where(eq(spcRunItems.runId, start.body.id));
    expect(items.find((i) => i.characteristicId === good.characteristicId)).toMatchObject({ status: 'succeeded', attempts: 1 });
  });

  it('answers 404 for an unknown run and 400 for a malformed id or body', async () => {
    const h = await api.as('quality_manager');
    expect((await request(api.app).get('/api/v1/spc-runs/99999999').set(h)).status).toBe(404);
    expect((await request(api.app).get('/api/v1/spc-runs/abc').set(h)).status).toBe(400);
    expect((await request(api.app).post('/api/v1/spc-runs').set(h).send({ characteristicIds: [] })).status).toBe(400);
  });
});
