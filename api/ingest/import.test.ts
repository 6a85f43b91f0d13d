// The import keeps one query at a time on each connection: node-postgres deprecates queueing a query
// on a client that is still executing one (pg 8.x, client.js), and will refuse it in pg 9.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';

const warnings: Error[] = [];
const keep = (warning: Error) => warnings.push(warning);
// Listening from the start of the file: Node gives each deprecation once a process.
beforeAll(() => process.on('warning', keep));
const api = createTestApi();
afterAll(async () => {
  process.off('warning', keep);
  await api.close();
});

describe('importResults', () => {
  it('stores a file of several rounds with no query queued behind another on one connection', async () => {
    const token = await api.tokenFor('technician');
    const tag = `Q${Date.now().toString(36).toUpperCase()}`;
    const rows = ['lot,product,line,produced_at,characteristic,value,replicate'];
    // 3,000 rows: the short first round (2,000 rows) and a second, so rounds overlap the stored file.
    for (let i = 0; i < 1_500; i++) for (let r = 1; r <= 2; r++) rows.push(`${tag}-${i},HVL25,L1,${new Date(Date.UTC(2020, 0, 1, 6) + i * 600_000).toISOString()},HVL25-FLOW,${140 + (i % 9)},${r}`);
    const res = await request(api.app).post('/api/v1/uploads').set({ authorization: `Bearer ${token}` }).attach('file', Buffer.from(`${rows.join('\n')}\n`), 'rounds.csv');
    expect(res.status).toBe(201);
    expect(res.body.rowsImported).toBe(3_000);
    // A rejected file takes the other path: rollback, then the file kept as evidence.
    const bad = await request(api.app).post('/api/v1/uploads').set({ authorization: `Bearer ${token}` }).attach('file', Buffer.from(`${rows[0]}\n${tag}-x,HVL25,L1,2020-01-01T06:00Z,HVL25-FLOW,abc,1\n`), 'bad.csv');
    expect(bad.status).toBe(422);
    expect(warnings.map((w) => w.message).filter((m) => /already executing a query/.test(m))).toEqual([]);
  });
});
