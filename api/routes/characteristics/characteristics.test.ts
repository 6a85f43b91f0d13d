import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { eq } from 'drizzle-orm';
import { specLimits, spcRunItems, spcRuns } from '@api/db/schema';
import { createTestApi } from '@tests/support/api';
import { catalogueReaders, catalogueTestKit, removeCatalogueRecords, testCodePrefix } from '@tests/support/catalogue';

const api = createTestApi();
const prefix = testCodePrefix('C');
afterAll(async () => {
  await removeCatalogueRecords(api.db, prefix);
  await api.close();
});
const { as, admin, newCode, auditOf, newProduct, rc28, newCharacteristic } = catalogueTestKit(api, prefix);

describe('who may change them', () => {
  for (const role of catalogueReaders) {
    it(`refuses every write to ${role} (403) and still lets them read`, async () => {
      const h = await as(role);
      const writes = {
        'POST /characteristics': request(api.app).post('/api/v1/characteristics').set(h).send(rc28('HVL25', { code: newCode('C') })),
        'PATCH /characteristics/1': request(api.app).patch('/api/v1/characteristics/1').set(h).send({ active: false }),
        'DELETE /characteristics/1': request(api.app).delete('/api/v1/characteristics/1').set(h),
      };
      for (const [label, write] of Object.entries(writes)) expect((await write).status, label).toBe(403);
      expect((await request(api.app).get('/api/v1/characteristics').set(h)).status).toBe(200);
    });
  }

  it('answers 401 without a session', async () => {
    expect((await request(api.app).patch('/api/v1/characteristics/1').send({ active: false })).status).toBe(401);
    expect((await request(api.app).get('/api/v1/characteristics')).status).toBe(401);
  });
});

describe('the list other screens read', () => {
  it('keeps its fields and adds only what the administrator needs', async () => {
    const h = await as('technician');
    const flow = (await request(api.app).get('/api/v1/characteristics').set(h)).body.items.find((c: { code: string }) => c.code === 'HVL25-FLOW');
    expect(Object.keys(flow).sort()).toEqual(
      ['active', 'ageDays', 'capabilityThreshold', 'chartType', 'code', 'decimals', 'hasResults', 'id', 'lineCode', 'name', 'productCode', 'productFamily', 'productId', 'productName', 'rawLoad', 'ruleSet', 'samplingPlan', 'spec', 'standard', 'subgroupSize', 'testMethodCode', 'testMethodName', 'unit'].sort(),
    );
    expect(flow).toMatchObject({ subgroupSize: 2, chartType: 'xbar-r', ageDays: null, hasResults: true });
  });

  it('shares its path with the chart and specification routes', async () => {
    const h = await as('auditor');
    const flow = (await request(api.app).get('/api/v1/characteristics').set(h)).body.items.find((c: { code: string }) => c.code === 'HVL25-FLOW');
    expect((await request(api.app).get(`/api/v1/characteristics/${flow.id}/chart`).set(h)).status).toBe(200);
    expect((await request(api.app).get(`/api/v1/characteristics/${flow.id}/spec-revisions`).set(h)).status).toBe(200);
    expect((await request(api.app).get(`/api/v1/characteristics/${flow.id}/limit-revisions`).set(h)).status).toBe(200);
  });
});

describe('characteristics', () => {
  it('take the unit from the test method and may bring their first specification revision', async () => {
    const product = await newProduct();
    const created = await newCharacteristic(rc28(product.code, { samplingPlan: 'First lot of each shift; a set of three prisms', spec: { lsl: 25, reason: 'Lower limit from the declared class C25' } }));
    expect(created.status).toBe(201);
    // EN 196-1 gives compressive strength in MPa (N/mm²).
    expect(created.body).toMatchObject({ code: `${product.code}-RC28`, unit: 'MPa', testMethodCode: 'RC', ageDays: 28, subgroupSize: 6, chartType: 'xbar-r', active: true, hasResults: false });
    expect(created.body.spec).toMatchObject({ revision: 1, lsl: 25, usl: null, target: null });

    const [revision] = await api.db.select().from(specLimits).where(eq(specLimits.characteristicId, created.body.id));
    expect(revision.reason).toBe('Lower limit from the declared class C25');
    const history = await request(api.app).get(`/api/v1/characteristics/${created.body.id}/spec-revisions`).set(await as('auditor'));
    expect(history.body.items.map((r: { revision: number }) => r.revision)).toEqual([1]);
    expect((await auditOf('characteristic', created.body.id)).map((e) => e.action)).toEqual(['create', 'revise specification']);

    const fresh = await newCharacteristic({ code: `${product.code}-AIR`, name: 'HV Render Light · air content', productCode: product.code, testMethodCode: 'AIR', ageDays: null, subgroupSize: 1, chartType: 'imr', ruleSet: 'extended' });
    expect(fresh.status).toBe(201);
    // EN 1015-7 gives the air content of fresh mortar in per cent by volume.
    expect(fresh.body).toMatchObject({ unit: '%', spec: null, ruleSet: 'extended', samplingPlan: null });
  });

  it('keep a capability threshold of their own, or none to follow the plant’s', async () => {
    const product = await newProduct();
    const created = await newCharacteristic(rc28(product.code, { capabilityThreshold: 1.67 }));
    expect(created.status).toBe(201);
    expect(created.body.capabilityThreshold).toBe(1.67);
    const h = await admin();
    const cleared = await request(api.app).patch(`/api/v1/characteristics/${created.body.id}`).set(h).send({ capabilityThreshold: null });
    expect(cleared.status).toBe(200);
    expect(cleared.body.capabilityThreshold).toBeNull();
    const refused = await request(api.app).patch(`/api/v1/characteristics/${created.body.id}`).set(h).send({ capabilityThreshold: 0.8 });
    expect(refused.status).toBe(400);
    expect(refused.body.details[0]).toEqual({ path: 'capabilityThreshold', message: 'The threshold is at least 1.00' });
    expect((await auditOf('characteristic', created.body.id)).map((e) => e.action)).toEqual(['create', 'update']);
  });

  it('refuse an unknown product or method (400) and a code in use (409)', async () => {
    const product = await newProduct();
    const unknownProduct = await newCharacteristic(rc28('NOSUCHPRODUCT', { code: newCode('C') }));
    expect(unknownProduct.status).toBe(400);
    expect(unknownProduct.body.details).toEqual([{ path: 'productCode', message: 'There is no product NOSUCHPRODUCT' }]);
    const unknownMethod = await newCharacteristic(rc28(product.code, { testMethodCode: 'SLUMP' }));
    expect(unknownMethod.status).toBe(400);
    expect(unknownMethod.body.details).toEqual([{ path: 'testMethodCode', message: 'Choose a test method from the catalogue' }]);
    const taken = await newCharacteristic(rc28(product.code, { code: 'hvl25-flow' }));
    expect(taken.status).toBe(409);
    expect(taken.body.error).toBe('Characteristic code HVL25-FLOW is already used by HV Level 25 · flow diameter');
  });

  it('refuse a subgroup size out of range and a chart type that does not fit it', async () => {
    const product = await newProduct();
    const refusal = async (extra: Record<string, unknown>) => {
      const res = await newCharacteristic(rc28(product.code, extra));
      expect(res.status, JSON.stringify(extra)).toBe(400);
      return res.body.details as { path: string; message: string }[];
    };
    // Control chart constants are tabled for subgroups of 2 to 25 (ASTM E2587, ISO 7870-2; from memory).
    expect(await refusal({ subgroupSize: 0 })).toContainEqual({ path: 'subgroupSize', message: 'The subgroup size is at least 1' });
    expect(await refusal({ subgroupSize: 26, chartType: 'xbar-s' })).toContainEqual({ path: 'subgroupSize', message: 'The subgroup size is at most 25' });
    expect(await refusal({ subgroupSize: 2.5 })).toContainEqual({ path: 'subgroupSize', message: 'The subgroup size is a whole number' });
    // An individuals chart plots one reading per lot; a range or standard deviation needs two (common practice).
    expect(await refusal({ subgroupSize: 3, chartType: 'imr' })).toEqual([
      { path: 'chartType', message: 'An individuals chart takes one reading per lot: set the subgroup size to 1, or choose X̄–R or X̄–S' },
    ]);
    expect((await refusal({ subgroupSize: 1, chartType: 'xbar-r' }))[0].path).toBe('chartType');
    expect((await refusal({ subgroupSize: 1, chartType: 'xbar-s' }))[0].path).toBe('chartType');
    // Above ten values the range wastes information and X̄–S serves (common practice; the engine's reason r-chart-large-subgroups).
    expect(await refusal({ subgroupSize: 12, chartType: 'xbar-r' })).toEqual([{ path: 'chartType', message: 'An X̄–R chart takes at most 10 readings per lot; choose the X̄–S chart' }]);
    expect((await newCharacteristic(rc28(product.code, { subgroupSize: 12, chartType: 'xbar-s' }))).status).toBe(201);
  });

  it('give an age to hardened-mortar tests only', async () => {
    const product = await newProduct();
    // Strength is tested on hardened prisms at an age; flow on fresh mortar minutes after mixing (EN 196-1, EN 12706).
    const noAge = await newCharacteristic(rc28(product.code, { ageDays: null }));
    expect(noAge.body.details).toEqual([{ path: 'ageDays', message: 'Compressive strength (prism halves, 40 × 40 mm platens) is tested on hardened specimens: give their age in days, e.g. 28' }]);
    const flowWithAge = await newCharacteristic(rc28(product.code, { code: `${product.code}-FLOW`, testMethodCode: 'FLOW', ageDays: 7, subgroupSize: 2 }));
    expect(flowWithAge.body.details).toEqual([{ path: 'ageDays', message: 'Flow diameter (ring spread on glass) is a fresh-mortar test: leave the age empty' }]);
  });

  it('start an incremental run when the chart type, subgroup size or run-rule set changes, and not for a new name', async () => {
    const product = await newProduct();
    const h = await admin();
    const created = await newCharacteristic(rc28(product.code, { subgroupSize: 3, chartType: 'xbar-r', ruleSet: 'we' }));
    const id = created.body.id;
    const runsOf = () =>
      api.db
        .select({ trigger: spcRuns.trigger, kind: spcRuns.kind })
        .from(spcRuns)
        .innerJoin(spcRunItems, eq(spcRunItems.runId, spcRuns.id))
        .where(eq(spcRunItems.characteristicId, id))
        .orderBy(spcRuns.id);
    expect(await runsOf()).toEqual([]);

    await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ name: 'HV Render Light · compressive strength at 28 days' }).expect(200);
    expect(await runsOf()).toEqual([]);

    await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ chartType: 'xbar-s', ruleSet: 'extended' }).expect(200);
    expect(await runsOf()).toEqual([{ trigger: 'settings', kind: 'incremental' }]);
    await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ subgroupSize: 4 }).expect(200);
    expect(await runsOf()).toEqual([
      { trigger: 'settings', kind: 'incremental' },
      { trigger: 'settings', kind: 'incremental' },
    ]);
  });

  it('keep code, product, method and age once results are recorded, and are deactivated rather than deleted', async () => {
    const product = await newProduct();
    const h = await admin();
    const created = await newCharacteristic(rc28(product.code, { subgroupSize: 3, chartType: 'xbar-r' }));
    const id = created.body.id;

    // Before any result, everything may still change.
    const recoded = await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ code: `${product.code}-RC7`, ageDays: 7 });
    expect(recoded.status).toBe(200);
    expect(recoded.body).toMatchObject({ code: `${product.code}-RC7`, ageDays: 7 });
    // A change of method brings the method's unit: air content in % (EN 1015-7).
    const air = await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ testMethodCode: 'AIR', ageDays: null });
    expect(air.body).toMatchObject({ testMethodCode: 'AIR', unit: '%' });
    await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ testMethodCode: 'RC', ageDays: 7 }).expect(200);

    // A merged change is judged whole: size 1 with the stored X̄–R chart does not fit.
    const misfit = await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ subgroupSize: 1 });
    expect(misfit.status).toBe(400);
    expect(misfit.body.details[0].path).toBe('chartType');

    const csv = `lot,product,line,produced_at,characteristic,value,replicate\n${product.code}-1,${product.code},L1,2021-03-01T07:00,${product.code}-RC7,21.5,1\n${product.code}-1,${product.code},L1,2021-03-01T07:00,${product.code}-RC7,22.1,2\n`;
    expect((await request(api.app).post('/api/v1/uploads').set(h).attach('file', Buffer.from(csv), `${product.code}.csv`)).status).toBe(201);
    expect((await request(api.app).get('/api/v1/characteristics').set(h)).body.items.find((c: { id: number }) => c.id === id).hasResults).toBe(true);

    const frozen = await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ code: `${product.code}-RC7B`, ageDays: 28 });
    expect(frozen.status).toBe(409);
    expect(frozen.body.error).toBe(`Results are recorded under ${product.code}-RC7, so its code and age cannot change. Deactivate it and add a new characteristic instead`);
    const shrink = await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ subgroupSize: 1, chartType: 'imr' });
    expect(shrink.status).toBe(409);
    expect(shrink.body.error).toMatch(/up to 2 readings stored, so the subgroup size cannot go below 2$/);
    expect(shrink.body.details[0].path).toBe('subgroupSize');
    const renamed = await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ name: 'HV Render Light · compressive strength · 7 d', subgroupSize: 2 });
    expect(renamed.body).toMatchObject({ name: 'HV Render Light · compressive strength · 7 d', subgroupSize: 2 });

    const removed = await request(api.app).delete(`/api/v1/characteristics/${id}`).set(h);
    expect(removed.status).toBe(405);
    expect(removed.body.error).toMatch(/^Characteristics are never deleted.*Deactivate it instead/);
    const off = await request(api.app).patch(`/api/v1/characteristics/${id}`).set(h).send({ active: false });
    expect(off.body.active).toBe(false);
    // A deactivated characteristic takes no more results.
    const later = csv.replaceAll(`${product.code}-1`, `${product.code}-2`);
    const refused = await request(api.app).post('/api/v1/uploads').set(h).attach('file', Buffer.from(later), `${product.code}-later.csv`);
    expect(refused.status).toBe(422);
    expect(refused.body.details[0]).toMatchObject({ column: 'characteristic', message: `Characteristic ${product.code}-RC7 is deactivated and takes no more results; an administrator can reactivate it` });

    const trail = await auditOf('characteristic', id);
    expect(trail.map((e) => e.action)).toEqual(['create', 'update', 'update', 'update', 'update', 'deactivate']);
    expect(trail.at(-1)!.before).toMatchObject({ code: `${product.code}-RC7`, active: true });
  });
});
