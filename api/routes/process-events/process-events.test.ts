import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';
import type { Role } from '@shared/schemas/users';

const api = createTestApi();
afterAll(() => api.close());
const as = async (role: Role) => ({ authorization: `Bearer ${await api.tokenFor(role)}` });

describe('process events', () => {
  it('lists the demo events, among them the new sand source', async () => {
    const res = await request(api.app).get('/api/v1/process-events').set(await as('auditor'));
    expect(res.status).toBe(200);
    expect(res.body.items.map((e: { title: string }) => e.title)).toContain('New sand source');
  });

  it('records an event for a product, taking the product line, and filters by period', async () => {
    const res = await request(api.app)
      .post('/api/v1/process-events')
      .set(await as('technician'))
      .send({ occurredAt: '2021-03-04T10:00:00Z', title: 'Dosing scale checked', description: 'Weights verified, no drift', productCode: 'HVFX' });
    expect(res.status).toBe(201);
    const window = await request(api.app).get('/api/v1/process-events?from=2021-03-01T00:00:00Z&to=2021-03-31T00:00:00Z').set(await as('auditor'));
    expect(window.body.items).toEqual([expect.objectContaining({ title: 'Dosing scale checked', productCode: 'HVFX', lineCode: 'L2', createdBy: 'Demo Technician' })]);
  });

  it('explains bad input and refuses auditors', async () => {
    const bad = await request(api.app).post('/api/v1/process-events').set(await as('quality_manager')).send({ occurredAt: 'yesterday', title: 'x' });
    expect(bad.status).toBe(400);
    expect(bad.body.details.map((d: { path: string }) => d.path).sort()).toEqual(['occurredAt', 'title']);
    const unknown = await request(api.app).post('/api/v1/process-events').set(await as('quality_manager')).send({ occurredAt: '2021-03-04T10:00:00Z', title: 'Line stop', lineCode: 'L9' });
    expect(unknown.body.error).toMatch(/unknown production line "L9"/);
    expect((await request(api.app).post('/api/v1/process-events').set(await as('auditor')).send({ occurredAt: '2021-03-04T10:00:00Z', title: 'Auditor note' })).status).toBe(403);
  });
});
