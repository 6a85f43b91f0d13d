import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { createTestApi } from '@tests/support/api';
import { auditEvents } from '@api/db/schema';
import type { Role } from '@shared/schemas/users';

const api = createTestApi();
afterAll(() => api.close());

const as = async (role: Role) => ({ authorization: `Bearer ${await api.tokenFor(role)}` });
const run = `${Date.now() % 1_000_000}`;

const pressExport = {
  format: 'wide',
  columns: { lot: 'Batch', product: 'Product', line: 'Line', produced_at: 'Made' },
  characteristicColumns: { 'Flow A': 'HVL25-FLOW', 'Flow B': 'HVL25-FLOW' },
} as const;

describe('/api/v1/column-mappings', () => {
  it('saves a named mapping for a technician and lists it for every role, as saved', async () => {
    const name = `Ring export ${run}`;
    const saved = await request(api.app).post('/api/v1/column-mappings').set(await as('technician')).send({ name, mapping: pressExport });
    expect(saved.status).toBe(201);
    expect(saved.body).toMatchObject({ id: expect.any(Number), name, mapping: pressExport, createdByName: 'Demo Technician' });

    const list = await request(api.app).get('/api/v1/column-mappings').set(await as('auditor'));
    expect(list.status).toBe(200);
    expect(list.body.items.find((m: { name: string }) => m.name === name)).toMatchObject({ id: saved.body.id, mapping: pressExport, createdByName: 'Demo Technician' });

    const [trail] = await api.db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.entity, 'column mapping'), eq(auditEvents.entityId, String(saved.body.id))));
    expect(trail).toMatchObject({ action: 'create', after: { name } });
  });

  it('keeps names unique (409) and leaves the first mapping as it was', async () => {
    const name = `Density sheet ${run}`;
    const first = { format: 'long', columns: { value: 'Result' } };
    expect((await request(api.app).post('/api/v1/column-mappings').set(await as('technician')).send({ name, mapping: first })).status).toBe(201);
    const again = await request(api.app).post('/api/v1/column-mappings').set(await as('quality_manager')).send({ name: `  ${name} `, mapping: pressExport });
    expect(again.status).toBe(409);
    expect(again.body.error).toContain(name);
    const list = await request(api.app).get('/api/v1/column-mappings').set(await as('technician'));
    expect(list.body.items.filter((m: { name: string }) => m.name === name).map((m: { mapping: unknown }) => m.mapping)).toEqual([first]);
  });

  it('refuses a mapping the upload could not use (400 naming the field) and refuses auditors (403)', async () => {
    const incomplete = await request(api.app)
      .post('/api/v1/column-mappings')
      .set(await as('technician'))
      .send({ name: `Empty wide ${run}`, mapping: { format: 'wide', columns: {}, characteristicColumns: {} } });
    expect(incomplete.status).toBe(400);
    expect(incomplete.body.details).toEqual([{ path: 'mapping.characteristicColumns', message: 'Map at least one column to a characteristic' }]);
    const auditor = await request(api.app).post('/api/v1/column-mappings').set(await as('auditor')).send({ name: `Auditor ${run}`, mapping: pressExport });
    expect(auditor.status).toBe(403);
    expect((await request(api.app).get('/api/v1/column-mappings')).status).toBe(401);
  });

  it('gives back a mapping that imports the file it was made for', async () => {
    const name = `Wide flow ${run}`;
    await request(api.app).post('/api/v1/column-mappings').set(await as('technician')).send({ name, mapping: pressExport });
    const list = await request(api.app).get('/api/v1/column-mappings').set(await as('technician'));
    const { mapping } = list.body.items.find((m: { name: string }) => m.name === name);
    const lot = `M${run}`;
    const upload = await request(api.app)
      .post('/api/v1/uploads')
      .set(await as('technician'))
      .attach('file', Buffer.from(`Batch;Product;Line;Made;Flow A;Flow B\n${lot};HVL25;L1;2026-11-12 06:10;144;146\n`), 'ring.csv')
      .field('mapping', JSON.stringify(mapping));
    expect(upload.status).toBe(201);
    expect(upload.body.rowsImported).toBe(2);
  });
});
