import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';
import { catalogueReaders, catalogueTestKit, removeCatalogueRecords, testCodePrefix } from '@tests/support/catalogue';

const api = createTestApi();
const prefix = testCodePrefix('L');
afterAll(async () => {
  await removeCatalogueRecords(api.db, prefix);
  await api.close();
});
const { as, admin, newCode, auditOf, newLine, newProduct, rc28, newCharacteristic } = catalogueTestKit(api, prefix);

describe('who may change them', () => {
  for (const role of catalogueReaders) {
    it(`refuses every write to ${role} (403) and still lets them read`, async () => {
      const h = await as(role);
      const writes = {
        'POST /lines': request(api.app).post('/api/v1/lines').set(h).send({ code: newCode('L'), name: 'Line 9' }),
        'PATCH /lines/1': request(api.app).patch('/api/v1/lines/1').set(h).send({ name: 'Renamed' }),
        'DELETE /lines/1': request(api.app).delete('/api/v1/lines/1').set(h),
      };
      for (const [label, write] of Object.entries(writes)) expect((await write).status, label).toBe(403);
      expect((await request(api.app).get('/api/v1/lines').set(h)).status).toBe(200);
    });
  }

  it('answers 401 without a session', async () => {
    expect((await request(api.app).post('/api/v1/lines').send({ code: newCode('L'), name: 'Line 9' })).status).toBe(401);
    expect((await request(api.app).get('/api/v1/lines')).status).toBe(401);
  });
});

describe('the list other screens read', () => {
  it('keeps its fields and adds only what the administrator needs', async () => {
    const h = await as('technician');
    const lines = (await request(api.app).get('/api/v1/lines').set(h)).body.items;
    expect(lines.filter((l: { code: string }) => l.code === 'L1' || l.code === 'L2')).toEqual([
      { id: expect.any(Number), code: 'L1', name: 'Line 1 · levelling compounds', active: true, hasLots: true },
      { id: expect.any(Number), code: 'L2', name: 'Line 2 · adhesives and repair mortars', active: true, hasLots: true },
    ]);
  });
});

describe('production lines', () => {
  it('are added with an upper-case code, renamed and recoded while no lot was made on them, with an audit trail', async () => {
    const code = newCode('l').toLowerCase();
    const created = await request(api.app).post('/api/v1/lines').set(await admin()).send({ code, name: '  Line 3 · renders ' });
    expect(created.status).toBe(201);
    expect(created.body).toEqual({ id: expect.any(Number), code: code.toUpperCase(), name: 'Line 3 · renders', active: true, hasLots: false });
    const id = created.body.id;

    const renamed = await request(api.app).patch(`/api/v1/lines/${id}`).set(await admin()).send({ name: 'Line 3 · renders and plasters' });
    expect(renamed.status).toBe(200);
    expect(renamed.body.name).toBe('Line 3 · renders and plasters');
    const recoded = newCode('L');
    expect((await request(api.app).patch(`/api/v1/lines/${id}`).set(await admin()).send({ code: recoded })).body.code).toBe(recoded);

    const trail = await auditOf('production line', id);
    expect(trail.map((e) => e.action)).toEqual(['create', 'update', 'update']);
    expect(trail[1].before).toMatchObject({ name: 'Line 3 · renders' });
    expect(trail[1].after).toMatchObject({ name: 'Line 3 · renders and plasters' });
  });

  it('refuse a code in use (409), whatever its letter case, and a code change once lots were made (409)', async () => {
    const taken = await request(api.app).post('/api/v1/lines').set(await admin()).send({ code: 'l1', name: 'Another line 1' });
    expect(taken.status).toBe(409);
    expect(taken.body.error).toBe('Line code L1 is already used by Line 1 · levelling compounds');
    expect(taken.body.details).toEqual([{ path: 'code', message: taken.body.error }]);

    const lines = (await request(api.app).get('/api/v1/lines').set(await admin())).body.items;
    const l1 = lines.find((l: { code: string }) => l.code === 'L1');
    const recode = await request(api.app).patch(`/api/v1/lines/${l1.id}`).set(await admin()).send({ code: newCode('L') });
    expect(recode.status).toBe(409);
    expect(recode.body.error).toMatch(/^Lots were made on line L1/);
  });

  it('explain invalid input field by field, and are never deleted (405)', async () => {
    const bad = await request(api.app).post('/api/v1/lines').set(await admin()).send({ code: 'L 3', name: '' });
    expect(bad.status).toBe(400);
    expect(bad.body.details.map((d: { path: string }) => d.path).sort()).toEqual(['code', 'name']);
    const empty = await request(api.app).patch('/api/v1/lines/1').set(await admin()).send({});
    expect(empty.status).toBe(400);
    expect(empty.body.error).toMatch(/^Nothing to change/);
    expect((await request(api.app).patch('/api/v1/lines/999999').set(await admin()).send({ name: 'Ghost line' })).status).toBe(404);
    const line = await newLine();
    const removed = await request(api.app).delete(`/api/v1/lines/${line.id}`).set(await admin());
    expect(removed.status).toBe(405);
    expect(removed.headers.allow).toBe('PATCH');
    expect(removed.body.error).toMatch(/never deleted/);
  });

  it('are deactivated and reactivated: a deactivated line takes no new results', async () => {
    const h = await admin();
    const line = await newLine();
    const product = await newProduct(line.code);
    const created = await newCharacteristic(rc28(product.code, { subgroupSize: 2 }));
    expect(created.status).toBe(201);
    const csv = (lot: string) =>
      `lot,product,line,produced_at,characteristic,value,replicate\n${lot},${product.code},${line.code},2021-04-01T07:00,${product.code}-RC28,30.5,1\n${lot},${product.code},${line.code},2021-04-01T07:00,${product.code}-RC28,31.2,2\n`;
    const upload = (lot: string) => request(api.app).post('/api/v1/uploads').set(h).attach('file', Buffer.from(csv(lot)), `${lot}.csv`);

    const off = await request(api.app).patch(`/api/v1/lines/${line.id}`).set(h).send({ active: false });
    expect(off.status).toBe(200);
    expect(off.body.active).toBe(false);
    expect((await request(api.app).get('/api/v1/lines').set(h)).body.items.find((l: { id: number }) => l.id === line.id).active).toBe(false);
    const refused = await upload(`${product.code}-1`);
    expect(refused.status).toBe(422);
    expect(refused.body.details[0]).toMatchObject({ column: 'line' });
    expect(refused.body.details[0].message).toMatch(new RegExp(`^Unknown production line "${line.code}"`));

    const on = await request(api.app).patch(`/api/v1/lines/${line.id}`).set(h).send({ active: true });
    expect(on.body.active).toBe(true);
    expect((await upload(`${product.code}-1`)).status).toBe(201);

    const trail = await auditOf('production line', line.id);
    expect(trail.map((e) => e.action)).toEqual(['create', 'deactivate', 'reactivate']);
    expect(trail[1].before).toMatchObject({ active: true });
    expect(trail[1].after).toMatchObject({ active: false });
  });
});
