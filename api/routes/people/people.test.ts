import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';

const api = createTestApi();
afterAll(() => api.close());

describe('GET /api/v1/people', () => {
  it('lists the active users by name and role, without their e-mail addresses, to every role', async () => {
    const technician = await api.tokenFor('technician');
    const res = await request(api.app).get('/api/v1/people').set('Authorization', `Bearer ${technician}`);
    expect(res.status).toBe(200);
    const names = res.body.items.map((p: { name: string }) => p.name);
    expect(names).toContain('Demo Quality Manager');
    for (const p of res.body.items) expect(Object.keys(p).sort()).toEqual(['id', 'name', 'role']);
  });

  it('answers 401 without a session', async () => {
    expect((await request(api.app).get('/api/v1/people')).status).toBe(401);
  });
});
