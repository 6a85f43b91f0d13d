import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';

const api = createTestApi();
afterAll(() => api.close());
const auditor = async () => ({ authorization: `Bearer ${await api.tokenFor('auditor')}` });

describe('GET /api/v1/lots', () => {
  it('lists a product’s lots newest first, narrowed by the start of the lot number', async () => {
    const res = await request(api.app).get('/api/v1/lots').query({ product: 'HVL25', limit: 5 }).set(await auditor());
    expect(res.status).toBe(200);
    expect(res.body.items).toHaveLength(5);
    const times = res.body.items.map((l: { producedAt: string }) => Date.parse(l.producedAt));
    expect(times).toEqual([...times].sort((a, b) => b - a));
    for (const lot of res.body.items) expect(lot).toMatchObject({ productCode: 'HVL25', lineCode: 'L1' });

    const start = res.body.items[0].lotNumber.slice(0, -1);
    const narrowed = await request(api.app).get('/api/v1/lots').query({ q: start }).set(await auditor());
    expect(narrowed.body.items.length).toBeGreaterThan(0);
    for (const lot of narrowed.body.items) expect(lot.lotNumber.startsWith(start)).toBe(true);
    // A LIKE wildcard typed by the user is a character to match, not a pattern.
    expect((await request(api.app).get('/api/v1/lots').query({ q: '%' }).set(await auditor())).body.items).toEqual([]);
  });

  it('finds a lot typed in lower case, the lot typed in full first, within the limit', async () => {
    const [newest] = (await request(api.app).get('/api/v1/lots').query({ product: 'HVL25', limit: 1 }).set(await auditor())).body.items;
    const res = await request(api.app).get('/api/v1/lots').query({ q: newest.lotNumber.toLowerCase(), limit: 3 }).set(await auditor());
    expect(res.status).toBe(200);
    expect(res.body.items[0].lotNumber).toBe(newest.lotNumber);
    // The start of a number matches many lots; the limit bounds the answer.
    const many = await request(api.app).get('/api/v1/lots').query({ q: newest.lotNumber.slice(0, 2), limit: 3 }).set(await auditor());
    expect(many.body.items).toHaveLength(3);
  });

  it('refuses a control character in the search with a plain 400, not a database error', async () => {
    for (const q of ['L1\u0000', 'L1\nX']) {
      const res = await request(api.app).get('/api/v1/lots').query({ q }).set(await auditor());
      expect(res.status, JSON.stringify(q)).toBe(400);
      expect(res.body.details[0]).toEqual({ path: 'q', message: 'The lot number may not contain control characters' });
    }
    const long = await request(api.app).get('/api/v1/lots').query({ q: 'L'.repeat(65) }).set(await auditor());
    expect(long.status).toBe(400);
  });

  it('refuses a limit out of range (400) and answers 401 without a session', async () => {
    const res = await request(api.app).get('/api/v1/lots').query({ limit: 1000 }).set(await auditor());
    expect(res.status).toBe(400);
    expect(res.body.details[0].path).toBe('limit');
    expect((await request(api.app).get('/api/v1/lots')).status).toBe(401);
  });
});

describe('GET /api/v1/lots/:lotNumber', () => {
  it('gives a lot with its results and the specification revisions in force when it was made', async () => {
    const [newest] = (await request(api.app).get('/api/v1/lots').query({ product: 'HVL25', limit: 1 }).set(await auditor())).body.items;
    const res = await request(api.app).get(`/api/v1/lots/${encodeURIComponent(newest.lotNumber)}`).set(await auditor());
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ lotNumber: newest.lotNumber, productCode: 'HVL25', productName: 'HV Level 25', lineCode: 'L1' });
    expect(res.body.results.length).toBeGreaterThan(0);
    for (const r of res.body.results) expect(res.body.specs[r.characteristicCode]?.revision ?? 0).toBeGreaterThanOrEqual(1);
  });

  it('answers 404 for a lot that does not exist', async () => {
    const res = await request(api.app).get('/api/v1/lots/NO-SUCH-LOT').set(await auditor());
    expect(res.status).toBe(404);
    expect(res.body.error).toBe('Lot NO-SUCH-LOT not found');
  });
});
