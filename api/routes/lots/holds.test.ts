// Lot status, hold and release: who may do what, what is refused, what is written with it (audit, e-mail),
// and the automatic hold of a lot out of specification. Keeping nonconforming product from dispatch until a
// recorded, authorised decision releases it follows ISO 9001:2015 clause 8.7 "Control of nonconforming outputs"
// (clause number from memory); who may release is the plant's own rule (shared/permissions.ts).
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { alarmSubscriptions } from '@api/db/schema';
import { runCharacteristic } from '@api/spc/run';
import { createSpcTestApi } from '@tests/support/spc-api';
import { createRunRow, createTestCharacteristic, removeTestCharacteristics, testDay, userIdByEmail, type TestCharacteristic } from '@tests/support/plant';

const api = createSpcTestApi();
const db = api.db;
let t: TestCharacteristic;
let managerId: number;
const ncrIds: number[] = [];

beforeAll(async () => {
  // Flow diameter 135–155 mm from 2025 on (an invented specification of the test product).
  t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2, specs: [{ lsl: 135, usl: 155, effectiveFrom: '2025-01-01T00:00:00Z' }] });
  managerId = await userIdByEmail(db, 'manager@harrowvale.example');
  await db.insert(alarmSubscriptions).values({ userId: managerId, productId: t.productId, immediate: true, digest: false });
});
afterAll(async () => {
  if (ncrIds.length) {
    await db.execute(sql`delete from ncr_lots where ncr_id = any(${sql.param(ncrIds)}::int[])`);
    await db.execute(sql`delete from ncrs where id = any(${sql.param(ncrIds)}::int[])`);
  }
  await removeTestCharacteristics(db);
  await api.close();
});

const lotPath = (lot: string) => `/api/v1/lots/${encodeURIComponent(lot)}`;
const hold = async (role: Parameters<typeof api.as>[0], lot: string, reason: unknown) => request(api.app).post(`${lotPath(lot)}/hold`).set(await api.as(role)).send({ reason });
const release = async (role: Parameters<typeof api.as>[0], lot: string, reason: unknown) => request(api.app).post(`${lotPath(lot)}/release`).set(await api.as(role)).send({ reason });
const detail = async (lot: string) => (await request(api.app).get(lotPath(lot)).set(await api.as('auditor'))).body;
const lotIdOf = async (lot: string) => (await db.execute<{ id: number }>(sql`select id from lots where lot_number = ${lot}`)).rows[0].id;
const holdsOf = async (lotId: number) =>
  (await db.execute<{ id: number; source: string; reason: string; alarm_id: number | null; placed_by: number | null; placed_at: Date; released_at: Date | null }>(
    sql`select id, source, reason, alarm_id, placed_by, placed_at, released_at from lot_holds where lot_id = ${lotId} order by id`,
  )).rows;
const auditOf = async (lot: string) =>
  (await db.execute<{ action: string; actor_id: number | null; reason: string | null; at: Date }>(sql`select action, actor_id, reason, at from audit_events where entity = 'lot' and entity_id = ${lot} order by id`)).rows;
const mailOf = async (lotId: number) =>
  (await db.execute<{ kind: string; user_id: number | null; subject: string; text_body: string; created_at: Date }>(
    sql`select kind, user_id, subject, text_body, created_at from mail_outbox where refs -> 'lotIds' @> ${JSON.stringify([lotId])}::jsonb order by id`,
  )).rows;
/** Yesterday in plant-time text (the demo plant keeps UK time; a day back is safely in the past either side of summer time). */
const yesterdayText = () => new Date(Date.now() - 86_400_000).toISOString().slice(0, 16);

describe('POST /api/v1/lots/:lotNumber/hold and /release', () => {
  it('lets a technician put a lot on hold and only a quality manager release it, each with audit row and e-mail in the same transaction', async () => {
    await t.addLot('M1', testDay(10), [145, 146]);
    const lot = t.lotNumber('M1');
    const lotId = await lotIdOf(lot);
    expect((await detail(lot)).status).toBe('released');

    const held = await hold('technician', lot, 'Bag weights checked short on the filling line');
    expect(held.status).toBe(200);
    expect(held.body).toMatchObject({ lotNumber: lot, status: 'on-hold' });
    expect(held.body.holds[0]).toMatchObject({ source: 'manual', reason: 'Bag weights checked short on the filling line', placedBy: 'Demo Technician', releasedAt: null, causeWithdrawn: false });

    // A second hold of a held lot is refused; releasing is for quality managers; auditors only read.
    expect((await hold('technician', lot, 'Held a second time')).status).toBe(409);
    const techRelease = await release('technician', lot, 'Weights rechecked');
    expect(techRelease.status).toBe(403);
    expect(techRelease.body.error).toBe('Your role does not allow this action');
    expect((await release('auditor', lot, 'Weights rechecked')).status).toBe(403);

    const released = await release('quality_manager', lot, 'Weights rechecked on 20 bags, all inside tolerance');
    expect(released.status).toBe(200);
    expect(released.body.status).toBe('released');
    expect(released.body.holds[0]).toMatchObject({ releasedBy: 'Demo Quality Manager', releaseReason: 'Weights rechecked on 20 bags, all inside tolerance' });
    expect((await release('quality_manager', lot, 'Released a second time')).status).toBe(409);

    const holds = await holdsOf(lotId);
    expect(holds).toHaveLength(1);
    const audit = await auditOf(lot);
    expect(audit.map((a) => [a.action, a.reason])).toEqual([
      ['hold', 'Bag weights checked short on the filling line'],
      ['release', 'Weights rechecked on 20 bags, all inside tolerance'],
    ]);
    // now() is the start time of the current transaction (PostgreSQL manual, 9.9.5 "Current Date/Time"):
    // hold, audit row and queued e-mail carrying the same instant were written by one transaction.
    expect(new Date(audit[0].at).getTime()).toBe(new Date(holds[0].placed_at).getTime());
    expect(new Date(audit[1].at).getTime()).toBe(new Date(holds[0].released_at!).getTime());

    const mail = await mailOf(lotId);
    const toManager = mail.filter((m) => m.user_id === managerId);
    expect(toManager.map((m) => m.kind)).toEqual(['lot-hold', 'lot-release']);
    expect(new Date(toManager[0].created_at).getTime()).toBe(new Date(holds[0].placed_at).getTime());
    expect(toManager[0].subject).toBe(`Prismline: lot ${lot} (${t.productCode}) put on hold`);
    expect(toManager[0].text_body).toContain('Reason: Bag weights checked short on the filling line');
    expect(toManager[0].text_body).toContain('Put on hold by: Demo Technician');
    expect(toManager[0].text_body).toContain(`Lot page: http://prismline.test/results/lots/${lot}`);
    expect(toManager[1].text_body).toContain('Released by: Demo Quality Manager');
    expect(toManager[1].text_body).toContain('Held because: Bag weights checked short on the filling line');
  });

  it('refuses a bad reason with a plain 400 naming the field, and an unknown lot with 404', async () => {
    await t.addLot('M2', testDay(11), [145, 146]);
    const lot = t.lotNumber('M2');
    for (const [reason, message] of [
      ['no', 'Write at least 5 characters for a reason'],
      ['Bad\u0000reason', 'A reason may not contain control characters'],
      ['x'.repeat(1001), 'Keep a reason under 1000 characters'],
      [undefined, 'Give a reason'],
    ] as const) {
      const res = await hold('technician', lot, reason);
      expect(res.status, JSON.stringify(reason)).toBe(400);
      expect(res.body.details[0]).toEqual({ path: 'reason', message });
    }
    expect((await detail(lot)).status).toBe('released');
    const unknown = await hold('technician', 'NO-SUCH-LOT', 'Checking an unknown lot');
    expect(unknown.status).toBe(404);
    expect(unknown.body.error).toBe('Lot NO-SUCH-LOT not found');
    expect((await release('quality_manager', 'NO-SUCH-LOT', 'Checking an unknown lot')).status).toBe(404);
    expect((await hold('auditor', lot, 'Auditors only read the record')).status).toBe(403);
  });
});

describe('lot status', () => {
  it('is released, on hold, or rejected once an NCR scraps the lot, in the detail and the list filter', async () => {
    for (const s of ['S1', 'S2', 'S3']) await t.addLot(s, testDay(20 + Number(s[1])), [145, 146]);
    const [releasedLot, heldLot, scrappedLot] = ['S1', 'S2', 'S3'].map((s) => t.lotNumber(s));
    expect((await hold('technician', heldLot, 'Retained sample looks lumpy')).status).toBe(200);
    expect((await hold('technician', scrappedLot, 'Retained sample looks lumpy')).status).toBe(200);
    const [plant] = (await db.execute<{ id: number }>(sql`select id from plants order by id limit 1`)).rows;
    const ncr = await db.execute<{ id: number }>(sql`
      insert into ncrs (plant_id, number, year, sequence, title, description, severity, raised_from)
      values (${plant.id}, ${`NCR-T-${t.productCode}`}, 2099, ${Math.floor(Math.random() * 1e9)}, 'Lumps in the bag', 'Lumps found in retained samples', 'major', 'lot')
      returning id`);
    ncrIds.push(ncr.rows[0].id);
    await db.execute(sql`insert into ncr_lots (ncr_id, lot_id, disposition) values (${ncr.rows[0].id}, ${await lotIdOf(scrappedLot)}, 'scrap')`);

    expect((await detail(releasedLot)).status).toBe('released');
    expect((await detail(heldLot)).status).toBe('on-hold');
    // Scrapping decides the lot: rejected, even with its hold still open.
    const scrapped = await detail(scrappedLot);
    expect(scrapped.status).toBe('rejected');
    expect(scrapped.ncrs).toEqual([{ id: ncr.rows[0].id, number: `NCR-T-${t.productCode}`, title: 'Lumps in the bag', status: 'open', disposition: 'scrap' }]);

    const list = async (status: string) =>
      (await request(api.app).get('/api/v1/lots').query({ product: t.productCode, status, limit: 200 }).set(await api.as('auditor'))).body.items as {
        lotNumber: string;
        status: string;
        holdReason: string | null;
        heldSince: string | null;
      }[];
    const held = await list('on-hold');
    expect(held.map((l) => l.lotNumber)).toContain(heldLot);
    expect(held.map((l) => l.lotNumber)).not.toContain(scrappedLot);
    for (const l of held) expect(l.status).toBe('on-hold');
    expect(held.find((l) => l.lotNumber === heldLot)).toMatchObject({ holdReason: 'Retained sample looks lumpy' });
    expect(Date.parse(held.find((l) => l.lotNumber === heldLot)!.heldSince!)).toBeGreaterThan(0);
    expect((await list('rejected')).map((l) => l.lotNumber)).toEqual([scrappedLot]);
    const releasedList = await list('released');
    expect(releasedList.map((l) => l.lotNumber)).toContain(releasedLot);
    expect(releasedList.map((l) => l.lotNumber)).not.toContain(heldLot);
    for (const l of releasedList) expect(l).toMatchObject({ status: 'released', holdReason: null, heldSince: null });

    const bad = await request(api.app).get('/api/v1/lots').query({ status: 'shipped' }).set(await api.as('auditor'));
    expect(bad.status).toBe(400);
    expect(bad.body.details[0].path).toBe('status');
  });

  it('pages the list: limit and offset, with `more` while lots follow', async () => {
    const page = async (offset: number) => (await request(api.app).get('/api/v1/lots').query({ product: 'HVL25', limit: 2, offset }).set(await api.as('auditor'))).body;
    const first = await page(0);
    const second = await page(2);
    expect(first.items).toHaveLength(2);
    expect(first.more).toBe(true);
    expect(second.items[0].lotNumber).not.toBe(first.items[1].lotNumber);
    expect(Date.parse(second.items[0].producedAt)).toBeLessThanOrEqual(Date.parse(first.items[1].producedAt));
  });
});

describe('automatic hold of a lot out of specification', () => {
  it('holds a lot uploaded out of specification with the alarm that says so, in its transaction, and tells it in the alarm mail only', async () => {
    const lot = t.lotNumber('U1');
    const producedAt = new Date(Date.now() - 3_600_000).toISOString();
    const csv = `lot,product,line,produced_at,characteristic,value,replicate\n${lot},${t.productCode},L1,${producedAt},${t.code},160,1\n${lot},${t.productCode},L1,${producedAt},${t.code},161,2\n`;
    const up = await request(api.app).post('/api/v1/uploads').set(await api.as('technician')).attach('file', Buffer.from(csv), 'shift.csv');
    expect(up.status).toBe(201);
    const lotId = await lotIdOf(lot);
    const [alarm] = (await db.execute<{ id: number; description: string; created_at: Date }>(sql`select id, description, created_at from alarms where lot_id = ${lotId} and rule = 'out-of-spec'`)).rows;
    const holds = await holdsOf(lotId);
    expect(holds).toHaveLength(1);
    // The lot result (160 + 161) / 2 = 160.5 mm lies above the upper limit 155 mm.
    expect(holds[0]).toMatchObject({ source: 'out-of-spec', alarm_id: alarm.id, placed_by: null, released_at: null, reason: `${t.code} (Flow diameter): ${alarm.description}` });
    expect(new Date(holds[0].placed_at).getTime()).toBe(new Date(alarm.created_at).getTime());
    expect((await auditOf(lot)).map((a) => [a.action, a.actor_id])).toEqual([['hold automatically', null]]);

    const body = await detail(lot);
    expect(body.status).toBe('on-hold');
    expect(body.holds[0]).toMatchObject({ source: 'out-of-spec', placedBy: null, alarmId: alarm.id });
    // One event, one message: the alarm's e-mail says the lot is on hold; no separate hold message.
    const mail = (await mailOf(lotId)).filter((m) => m.user_id === managerId);
    expect(mail.map((m) => m.kind)).toEqual(['alarm']);
    expect(mail[0].text_body).toContain('Status: On hold');
  });

  it('holds a lot entered by hand out of specification', async () => {
    const lot = t.lotNumber('E1');
    const res = await request(api.app)
      .post('/api/v1/measurements')
      .set(await api.as('technician'))
      .send({ lot, product: t.productCode, line: 'L1', producedAt: yesterdayText(), results: [{ characteristic: t.code, replicates: [130, 131] }] });
    expect(res.status).toBe(201);
    const body = await detail(lot);
    expect(body.status).toBe('on-hold');
    expect(body.holds).toHaveLength(1);
    expect(body.holds[0].source).toBe('out-of-spec');
    // (130 + 131) / 2 = 130.5 mm lies below the lower limit 135 mm.
    expect(body.holds[0].reason).toContain('below the lower specification limit 135 mm');
  });

  it('holds a lot a run finds out of specification, once; a correction back inside keeps the hold and marks its cause withdrawn', async () => {
    // Old history, as a first run over months of data finds it: held, but no e-mail at once.
    for (let i = 0; i < 6; i++) await t.addLot(`R${i}`, testDay(40 + i), [145 + (i % 3), 146]);
    const bad = await t.addLot('R6', testDay(46), [170, 171]);
    const lot = t.lotNumber('R6');
    const lotId = await lotIdOf(lot);
    expect(await holdsOf(lotId)).toEqual([]);
    const runOnce = async () => {
      const runId = await createRunRow(db, [t.characteristicId]);
      await runCharacteristic(db, { runId, characteristicId: t.characteristicId, worker: 'test', publicUrl: 'http://prismline.test' });
    };
    await runOnce();
    const holds = await holdsOf(lotId);
    expect(holds).toHaveLength(1);
    expect(holds[0]).toMatchObject({ source: 'out-of-spec', placed_by: null });
    expect(await mailOf(lotId)).toEqual([]);

    // A person holds it too, or a run repeats: still the one open hold.
    expect((await hold('technician', lot, 'Held by hand as well')).status).toBe(409);
    await runOnce();
    expect(await holdsOf(lotId)).toHaveLength(1);

    // The first reading was mistyped: corrected, the lot result (146 + 147) / 2 = 146.5 mm is inside 135–155 mm.
    const fix = await request(api.app)
      .patch(`/api/v1/measurements/${bad.measurementIds[0]}`)
      .set(await api.as('technician'))
      .send({ value: 146, reason: 'Typing error: 146 read as 170' });
    expect(fix.status).toBe(200);
    await request(api.app)
      .patch(`/api/v1/measurements/${bad.measurementIds[1]}`)
      .set(await api.as('technician'))
      .send({ value: 147, reason: 'Typing error: 147 read as 171' });
    await runOnce();
    const after = await detail(lot);
    expect(after.status).toBe('on-hold');
    expect(after.holds).toHaveLength(1);
    expect(after.holds[0]).toMatchObject({ releasedAt: null, causeWithdrawn: true });
  });

  it('lists the held lot on the overview, oldest hold first', async () => {
    await t.addLot('V1', testDay(60), [145, 146]);
    const lot = t.lotNumber('V1');
    await hold('technician', lot, 'Overview check of a held lot');
    const res = await request(api.app).get('/api/v1/overview').query({ line: 'L1' }).set(await api.as('quality_manager'));
    expect(res.status).toBe(200);
    const { count, items } = res.body.heldLots as { count: number; items: { heldSince: string; lotNumber: string }[] };
    expect(count).toBeGreaterThanOrEqual(1);
    expect(items.length).toBe(Math.min(count, 10));
    const since = items.map((i) => Date.parse(i.heldSince));
    expect(since).toEqual([...since].sort((a, b) => a - b));
    const listed = (await request(api.app).get('/api/v1/lots').query({ status: 'on-hold', limit: 200 }).set(await api.as('auditor'))).body.items.map((l: { lotNumber: string }) => l.lotNumber);
    expect(listed).toContain(lot);
  });
});
