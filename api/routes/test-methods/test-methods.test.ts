import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';

const api = createTestApi();
afterAll(() => api.close());

describe('GET /api/v1/test-methods', () => {
  it('gives each method its standard, unit and cautions', async () => {
    const res = await request(api.app).get('/api/v1/test-methods').set({ authorization: `Bearer ${await api.tokenFor('auditor')}` });
    expect(res.status).toBe(200);
    const byCode = new Map(res.body.items.map((m: { code: string }) => [m.code, m]));
    // EN 196-1 gives flexural and compressive strength in MPa; EN 1015-7 air content in % by volume.
    expect(byCode.get('RC')).toMatchObject({ unit: 'MPa', state: 'hardened' });
    expect(byCode.get('RF')).toMatchObject({ unit: 'MPa', state: 'hardened' });
    expect(byCode.get('AIR')).toMatchObject({ unit: '%', state: 'fresh' });
    for (const m of res.body.items) expect(Array.isArray(m.cautions), m.code).toBe(true);
  });

  it('answers 401 without a session', async () => {
    expect((await request(api.app).get('/api/v1/test-methods')).status).toBe(401);
  });
});
