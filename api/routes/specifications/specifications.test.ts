import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';
import type { Role } from '@shared/schemas/users';

const api = createTestApi();
afterAll(() => api.close());
const as = async (role: Role) => ({ authorization: `Bearer ${await api.tokenFor(role)}` });

async function characteristicId(code: string): Promise<number> {
  const res = await request(api.app).get('/api/v1/characteristics').set(await as('auditor'));
  return res.body.items.find((c: { code: string }) => c.code === code).id;
}

describe('specification revisions', () => {
  it('adds a revision in force from now on, and refuses one dated before the revision in force', async () => {
    const id = await characteristicId('HVR3-DENS');
    const before = await request(api.app).get(`/api/v1/characteristics/${id}/spec-revisions`).set(await as('auditor'));
    expect(before.body.items[0]).toMatchObject({ revision: 1, lsl: 2030, usl: 2130 });

    const res = await request(api.app)
      .post(`/api/v1/characteristics/${id}/spec-revisions`)
      .set(await as('quality_manager'))
      .send({ lsl: 2040, usl: 2120, target: 2080, reason: 'Tighter band agreed with the customer' });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ revision: 2, lsl: 2040, usl: 2120, target: 2080 });

    const list = await request(api.app).get('/api/v1/characteristics').set(await as('auditor'));
    const ch = list.body.items.find((c: { id: number }) => c.id === id);
    expect(ch.spec).toMatchObject({ revision: 2, lsl: 2040, usl: 2120 });

    // A lot made yesterday keeps revision 1; the lot page judges it by that.
    const lot = `SPEC-${Date.now()}`;
    const produced = new Date(Date.now() - 86_400_000).toISOString();
    const csv = `lot,product,line,produced_at,characteristic,value\n${lot},HVR3,L2,${produced},HVR3-DENS,2035\n`;
    const uploaded = await request(api.app).post('/api/v1/uploads').set(await as('technician')).attach('file', Buffer.from(csv), 'spec.csv');
    expect(uploaded.status).toBe(201);
    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    expect(detail.body.specs['HVR3-DENS']).toMatchObject({ revision: 1, lsl: 2030, usl: 2130 });

    const backdated = await request(api.app)
      .post(`/api/v1/characteristics/${id}/spec-revisions`)
      .set(await as('quality_manager'))
      .send({ lsl: 2000, usl: 2150, effectiveFrom: '2020-01-01T00:00:00Z', reason: 'Back-dated widening' });
    expect(backdated.status).toBe(400);
    // The time it names is on the plant's clock (Europe/London, the demo plant's) in its date format, as
    // Intl writes it from the tz database, not in UTC.
    const parts = new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit' }).formatToParts(new Date(res.body.effectiveFrom));
    const part = (type: string) => parts.find((p) => p.type === type)!.value;
    expect(backdated.body.details).toEqual([
      { path: 'effectiveFrom', message: `A new revision cannot take effect before revision 2, in force from ${part('day')}/${part('month')}/${part('year')} ${part('hour')}:${part('minute')}` },
    ]);
  });

  it('allows one-sided specifications and refuses inconsistent ones with a message per field', async () => {
    const id = await characteristicId('HVR3-RC28');
    const h = await as('quality_manager');
    expect((await request(api.app).post(`/api/v1/characteristics/${id}/spec-revisions`).set(h).send({ lsl: 25, reason: 'EN 1504-3 class R3 lower limit' })).status).toBe(201);
    const inverted = await request(api.app).post(`/api/v1/characteristics/${id}/spec-revisions`).set(h).send({ lsl: 30, usl: 20, reason: 'inverted band' });
    expect(inverted.status).toBe(400);
    expect(inverted.body.details).toContainEqual({ path: 'usl', message: 'The lower limit must be below the upper limit' });
    const none = await request(api.app).post(`/api/v1/characteristics/${id}/spec-revisions`).set(h).send({ reason: 'no limits at all' });
    expect(none.body.details).toContainEqual({ path: 'lsl', message: 'Give a lower limit, an upper limit or both' });
    const target = await request(api.app).post(`/api/v1/characteristics/${id}/spec-revisions`).set(h).send({ lsl: 20, usl: 30, target: 35, reason: 'target outside' });
    expect(target.body.details).toContainEqual({ path: 'target', message: 'The target must lie within the limits' });
  });

  it('lets only quality managers and administrators revise specifications', async () => {
    const id = await characteristicId('HVR3-AIR');
    for (const role of ['technician', 'auditor'] as const) {
      expect((await request(api.app).post(`/api/v1/characteristics/${id}/spec-revisions`).set(await as(role)).send({ usl: 6, reason: 'not allowed' })).status).toBe(403);
    }
    expect((await request(api.app).post('/api/v1/characteristics/999999/spec-revisions').set(await as('admin')).send({ usl: 6, reason: 'unknown one' })).status).toBe(404);
  });
});
