import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq } from 'drizzle-orm';
import { createTestApi } from '@tests/support/api';
import { auditEvents, plants } from '@api/db/schema';

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

describe('PATCH /api/v1/plants/:id', () => {
  // A plant of this test alone: the demo plant's format stays as the browser tests beside this one expect it.
  const code = `TZ${Date.now().toString(36).toUpperCase()}`;
  const admin = async () => ({ authorization: `Bearer ${await api.tokenFor('admin')}` });
  const makePlant = async () => {
    const [plant] = await api.db.insert(plants).values({ code, name: 'Test works', timeZone: 'Europe/Berlin' }).returning();
    return plant;
  };

  it('lets an administrator set the date format, audited with before and after, and leaves the zone as it is', async () => {
    const plant = await makePlant();
    expect(plant.dateFormat).toBe('dd/MM/yyyy');
    const res = await request(api.app).patch(`/api/v1/plants/${plant.id}`).set(await admin()).send({ dateFormat: 'dd.MM.yyyy' });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id: plant.id, code, dateFormat: 'dd.MM.yyyy', timeZone: 'Europe/Berlin' });
    const listed = await request(api.app).get('/api/v1/plants').set(await admin());
    expect(listed.body.items.find((p: { code: string }) => p.code === code).dateFormat).toBe('dd.MM.yyyy');
    const audit = await api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'plant'), eq(auditEvents.entityId, String(plant.id))));
    expect(audit).toHaveLength(1);
    expect(audit[0]).toMatchObject({ action: 'update', before: { dateFormat: 'dd/MM/yyyy' }, after: { dateFormat: 'dd.MM.yyyy' } });
  });

  it('refuses a format outside the list, the time zone and an id out of range with a plain 4xx', async () => {
    const plant = (await api.db.select().from(plants).where(eq(plants.code, code)))[0] ?? (await makePlant());
    const wrong = await request(api.app).patch(`/api/v1/plants/${plant.id}`).set(await admin()).send({ dateFormat: 'd/M/yy' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.details[0]).toEqual({ path: 'dateFormat', message: 'Choose one of the date formats: dd/MM/yyyy, dd.MM.yyyy, yyyy-MM-dd, MM/dd/yyyy' });
    const zone = await request(api.app).patch(`/api/v1/plants/${plant.id}`).set(await admin()).send({ dateFormat: 'yyyy-MM-dd', timeZone: 'UTC' });
    expect(zone.status).toBe(400);
    expect((await request(api.app).patch('/api/v1/plants/2147483648').set(await admin()).send({ dateFormat: 'yyyy-MM-dd' })).status).toBe(400);
    expect((await request(api.app).patch('/api/v1/plants/2147483647').set(await admin()).send({ dateFormat: 'yyyy-MM-dd' })).status).toBe(404);
    const [after] = await api.db.select().from(plants).where(eq(plants.id, plant.id));
    expect(after.timeZone).toBe('Europe/Berlin');
  });

  it('sets the capability threshold of the falling-capability alarm, audited, two decimals from 1.00 to 3.00', async () => {
    const [plant] = await api.db.insert(plants).values({ code: `${code}C`, name: 'Threshold works', timeZone: 'Europe/Berlin' }).returning();
    // 1.33 is the usual minimum Cpk (common practice), the column's default.
    expect(plant.capabilityThreshold).toBe(1.33);
    const res = await request(api.app).patch(`/api/v1/plants/${plant.id}`).set(await admin()).send({ capabilityThreshold: 1.67 });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ capabilityThreshold: 1.67, dateFormat: 'dd/MM/yyyy' });
    const audit = await api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'plant'), eq(auditEvents.entityId, String(plant.id))));
    expect(audit.map((a) => [a.before, a.after])).toEqual([[{ capabilityThreshold: 1.33 }, { capabilityThreshold: 1.67 }]]);
    for (const bad of [0.5, 3.5, 1.333, 'high']) {
      const refused = await request(api.app).patch(`/api/v1/plants/${plant.id}`).set(await admin()).send({ capabilityThreshold: bad });
      expect(refused.status, String(bad)).toBe(400);
      expect(refused.body.details[0].path).toBe('capabilityThreshold');
    }
    const manager = await request(api.app).patch(`/api/v1/plants/${plant.id}`).set({ authorization: `Bearer ${await api.tokenFor('quality_manager')}` }).send({ capabilityThreshold: 1.5 });
    expect(manager.status).toBe(403);
  });
});
