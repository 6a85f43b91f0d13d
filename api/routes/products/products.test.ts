import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { createTestApi } from '@tests/support/api';
import { catalogueReaders, catalogueTestKit, removeCatalogueRecords, testCodePrefix } from '@tests/support/catalogue';

const api = createTestApi();
const prefix = testCodePrefix('P');
afterAll(async () => {
  await removeCatalogueRecords(api.db, prefix);
  await api.close();
});
const { as, admin, newCode, auditOf, newLine, newProduct } = catalogueTestKit(api, prefix);

describe('who may change them', () => {
  for (const role of catalogueReaders) {
    it(`refuses every write to ${role} (403) and still lets them read`, async () => {
      const h = await as(role);
      const writes = {
        'POST /products': request(api.app).post('/api/v1/products').set(h).send({ code: newCode('P'), name: 'Some mortar', family: 'repair', lineCode: 'L1' }),
        'PATCH /products/1': request(api.app).patch('/api/v1/products/1').set(h).send({ active: false }),
        'DELETE /products/1': request(api.app).delete('/api/v1/products/1').set(h),
      };
      for (const [label, write] of Object.entries(writes)) expect((await write).status, label).toBe(403);
      expect((await request(api.app).get('/api/v1/products').set(h)).status).toBe(200);
    });
  }

  it('answers 401 without a session', async () => {
    expect((await request(api.app).post('/api/v1/products').send({ code: newCode('P'), name: 'Some mortar', family: 'repair', lineCode: 'L1' })).status).toBe(401);
    expect((await request(api.app).get('/api/v1/products')).status).toBe(401);
  });
});

describe('the list other screens read', () => {
  it('keeps its fields and adds only what the administrator needs', async () => {
    const h = await as('technician');
    const product = (await request(api.app).get('/api/v1/products').set(h)).body.items.find((p: { code: string }) => p.code === 'HVL25');
    expect(product).toEqual({ id: expect.any(Number), code: 'HVL25', name: 'HV Level 25', family: 'levelling', declaredClass: 'CT-C25-F6', active: true, lineCode: 'L1', lineName: 'Line 1 · levelling compounds', hasLots: true });
  });
});

describe('products', () => {
  it('write an EN 13813 designation in its usual form and refuse a class the standard does not have', async () => {
    // Compressive classes of EN 13813 (from memory of its Table 2, as in shared/lab/en13813.test.ts):
    // … C20, C25, C30 …, so C25 is a class and C27 is not.
    const line = await newLine();
    const ok = await request(api.app).post('/api/v1/products').set(await admin()).send({ code: newCode('p'), name: 'HV Level 25 Plus', family: 'Levelling', declaredClass: 'ct-c25-f6', lineCode: line.code });
    expect(ok.status).toBe(201);
    expect(ok.body).toMatchObject({ family: 'levelling', declaredClass: 'CT-C25-F6', lineCode: line.code, active: true, hasLots: false });

    const wrong = await request(api.app).post('/api/v1/products').set(await admin()).send({ code: newCode('P'), name: 'HV Level 27', family: 'levelling', declaredClass: 'CT-C27-F6', lineCode: 'L1' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.details).toEqual([{ path: 'declaredClass', message: 'C27 is not a compressive class of EN 13813; write it like CT-C25-F6' }]);

    // EN 12004 tile adhesive classes are kept as typed: they are not EN 13813 designations.
    const adhesive = await request(api.app).post('/api/v1/products').set(await admin()).send({ code: newCode('P'), name: 'HV Fix Rapid', family: 'tile-adhesive', declaredClass: 'C2F S1', lineCode: 'L2' });
    expect(adhesive.body.declaredClass).toBe('C2F S1');
  });

  it('refuse an unknown line (400) and a code in use (409)', async () => {
    const unknown = await request(api.app).post('/api/v1/products').set(await admin()).send({ code: newCode('P'), name: 'HV Patch R4', family: 'repair', lineCode: 'NOSUCHLINE' });
    expect(unknown.status).toBe(400);
    expect(unknown.body.details).toEqual([{ path: 'lineCode', message: 'There is no production line NOSUCHLINE' }]);
    const taken = await request(api.app).post('/api/v1/products').set(await admin()).send({ code: 'hvl25', name: 'HV Level 25 again', family: 'levelling', lineCode: 'L1' });
    expect(taken.status).toBe(409);
    expect(taken.body.error).toBe('Product code HVL25 is already used by HV Level 25');
  });

  it('are moved to another line, deactivated and reactivated, never deleted, and keep a code lots were made under', async () => {
    const line = await newLine();
    const product = await newProduct();
    const h = await admin();
    const moved = await request(api.app).patch(`/api/v1/products/${product.id}`).set(h).send({ lineCode: line.code, declaredClass: '' });
    expect(moved.body).toMatchObject({ lineCode: line.code, declaredClass: null });
    const off = await request(api.app).patch(`/api/v1/products/${product.id}`).set(h).send({ active: false });
    expect(off.body.active).toBe(false);
    expect((await request(api.app).patch(`/api/v1/products/${product.id}`).set(h).send({ active: true })).body.active).toBe(true);
    expect((await auditOf('product', product.id)).map((e) => e.action)).toEqual(['create', 'update', 'deactivate', 'reactivate']);
    expect((await request(api.app).delete(`/api/v1/products/${product.id}`).set(h)).status).toBe(405);

    const demo = (await request(api.app).get('/api/v1/products').set(h)).body.items.find((p: { code: string }) => p.code === 'HVLF');
    const recode = await request(api.app).patch(`/api/v1/products/${demo.id}`).set(h).send({ code: newCode('P') });
    expect(recode.status).toBe(409);
    expect(recode.body.error).toMatch(/^Lots of HVLF are recorded under that code/);
  });
});
