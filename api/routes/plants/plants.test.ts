import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';

const api = createTestApi();
afterAll(() => api.close());

describe('GET /api/v1/plants', () => {
  it('lists the demo plant with its clock to every signed-in role', async () => {
    for (const role of ['technician', 'quality_manager', 'auditor', 'admin'] as const) {
      const res = await request(api.app).get('/api/v1/plants').set({ authorization: `Bearer ${await api.tokenFor(role)}` });
      expect(res.status, role).toBe(200);
      // The invented Harrow Vale plant keeps UK time: an IANA time zone name (tz database).
      expect(res.body.items[0]).toMatchObject({ code: 'HVMW', name: 'Harrow Vale Mortar Works', timeZone: 'Europe/London' });
    }
  });

  it('answers 401 without a session', async () => {
    const res = await request(api.app).get('/api/v1/plants');
    expect(res.status).toBe(401);
    expect(res.body.error).toMatch(/^Sign in to continue/);
  });
});
