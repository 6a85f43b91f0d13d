import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { productionLines } from '@api/db/schema';
import { createSpcTestApi } from '@tests/support/spc-api';
import { createTestCharacteristic, removeTestCharacteristics } from '@tests/support/plant';

const api = createSpcTestApi();
afterAll(async () => {
  await removeTestCharacteristics(api.db);
  await api.close();
});

describe('/api/v1/subscriptions', () => {
  it('lets each user add, change and remove their own subscriptions, and nobody else’s', async () => {
    const t = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2 });
    const [line] = await api.db.select({ id: productionLines.id }).from(productionLines).where(eq(productionLines.code, 'L2'));
    const tech = await api.as('technician');
    const created = await request(api.app).post('/api/v1/subscriptions').set(tech).send({ productId: t.productId, immediate: true, digest: false });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ productId: t.productId, productCode: t.productCode, lineId: null, immediate: true, digest: false });
    const byLine = await request(api.app).post('/api/v1/subscriptions').set(tech).send({ lineId: line.id, immediate: false, digest: true });
    expect(byLine.body).toMatchObject({ lineCode: 'L2', digest: true });
    expect((await request(api.app).post('/api/v1/subscriptions').set(tech).send({ productId: t.productId, immediate: false, digest: true })).status).toBe(409);

    const list = await request(api.app).get('/api/v1/subscriptions').set(tech);
    expect(list.body.items.map((s: { id: number }) => s.id).sort()).toEqual([created.body.id, byLine.body.id].sort());
    const managerList = await request(api.app).get('/api/v1/subscriptions').set(await api.as('quality_manager'));
    expect(managerList.body.items.map((s: { id: number }) => s.id)).not.toContain(created.body.id);

    expect((await request(api.app).patch(`/api/v1/subscriptions/${created.body.id}`).set(await api.as('quality_manager')).send({ digest: true })).status).toBe(404);
    expect((await request(api.app).delete(`/api/v1/subscriptions/${created.body.id}`).set(await api.as('admin'))).status).toBe(404);
    const patched = await request(api.app).patch(`/api/v1/subscriptions/${created.body.id}`).set(tech).send({ digest: true });
    expect(patched.body).toMatchObject({ immediate: true, digest: true });
    expect((await request(api.app).patch(`/api/v1/subscriptions/${created.body.id}`).set(tech).send({ immediate: false, digest: false })).status).toBe(400);
    expect((await request(api.app).delete(`/api/v1/subscriptions/${created.body.id}`).set(tech)).status).toBe(204);
    expect((await request(api.app).delete(`/api/v1/subscriptions/${byLine.body.id}`).set(tech)).status).toBe(204);
    expect((await request(api.app).get('/api/v1/subscriptions').set(tech)).body.items).toEqual([]);
  });

  it('refuses a subscription to both a line and a product, to neither kind of alert, or to what does not exist', async () => {
    const h = await api.as('auditor');
    const both = await request(api.app).post('/api/v1/subscriptions').set(h).send({ lineId: 1, productId: 1, immediate: true, digest: true });
    expect(both.status).toBe(400);
    expect(both.body.error).toMatch(/either a product line or a product/);
    expect((await request(api.app).post('/api/v1/subscriptions').set(h).send({ lineId: 1, immediate: false, digest: false })).status).toBe(400);
    expect((await request(api.app).post('/api/v1/subscriptions').set(h).send({ productId: 99999999, immediate: true, digest: false })).body.error).toMatch(/no product/);
  });
});
