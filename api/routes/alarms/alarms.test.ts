import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { alarms, alarmSubscriptions, auditEvents, mailOutbox, spcRuns } from '@api/db/schema';
import { refersTo } from '@api/mail/outbox';
import { createSpcTestApi, eventually, TEST_PUBLIC_URL } from '@tests/support/spc-api';
import { createTestCharacteristic, removeTestCharacteristics, userIdByEmail } from '@tests/support/plant';

const api = createSpcTestApi();
afterAll(async () => {
  await removeTestCharacteristics(api.db);
  await api.close();
});
const day = (d: number) => new Date(Date.UTC(2025, 6, 1 + d, 6)).toISOString();
const pair = (i: number): number[] => [145 + ((i * 7) % 5) - 2, 145 + ((i * 3) % 7) - 3];
const header = 'lot,product,line,produced_at,characteristic,value,replicate';

async function characteristicWithSignal() {
  const t = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2 });
  for (let i = 0; i < 24; i++) await t.addLot(`A${i}`, day(i), i === 22 ? [172, 173] : pair(i));
  const start = await request(api.app).post('/api/v1/spc-runs').set(await api.as('quality_manager')).send({ characteristicIds: [t.characteristicId] });
  await api.waitForRun(start.body.id);
  return t;
}

describe('GET /api/v1/alarms', () => {
  it('lists open alarms with characteristic, lot, rule, chart, point index, values, created time and status', async () => {
    const t = await characteristicWithSignal();
    const res = await request(api.app).get(`/api/v1/alarms?status=open&characteristicId=${t.characteristicId}`).set(await api.as('auditor'));
    expect(res.status).toBe(200);
    const we1 = res.body.items.find((a: { rule: string }) => a.rule === 'we1');
    expect(we1).toMatchObject({
      characteristic: { id: t.characteristicId, code: t.code, unit: 'mm', productCode: t.productCode },
      lot: { lotNumber: t.lotNumber('A22'), producedAt: day(22) },
      rule: 'we1',
      signal: 'Beyond a control limit',
      chart: 'location',
      pointIndex: 22,
      values: [172, 173],
      statistic: 172.5,
      limitName: 'UCL',
      status: 'open',
      chartUrl: `${TEST_PUBLIC_URL}/charts/${t.characteristicId}?lot=${t.lotNumber('A22')}`,
      // The figure of the chart the signal is on, beside that chart's own limit, to the method's decimals (flow: whole mm).
      figure: { name: 'subgroup mean', text: '173 mm' },
      limit: { name: 'upper control limit', text: expect.stringMatching(/^\d{3} mm$/) },
      description: expect.stringMatching(/^Subgroup mean 173 mm above the upper control limit \d{3} mm\.$/),
    });
    expect(Date.parse(we1.detectedAt)).toBeGreaterThan(Date.now() - 120_000);
    expect(Date.parse(we1.createdAt)).toBeGreaterThan(Date.now() - 120_000);
    expect(res.body.items.every((a: { status: string }) => a.status === 'open')).toBe(true);
    expect(res.body.counts.open).toBeGreaterThanOrEqual(1);
  });
});

describe('the order of what matters this morning', () => {
  it('lists a lot out of specification before one beyond a control limit before a pattern, the signals of one lot together', async () => {
    const t = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2, specs: [{ lsl: 130, usl: 160, effectiveFrom: day(-10) }] });
    // Lot 21: beyond the control limit only; lot 24 (the newest): beyond the specification as well.
    for (let i = 0; i < 26; i++) await t.addLot(`W${i}`, day(i), i === 21 ? [154, 155] : i === 24 ? [171, 172] : pair(i));
    const start = await request(api.app).post('/api/v1/spc-runs').set(await api.as('quality_manager')).send({ characteristicIds: [t.characteristicId] });
    await api.waitForRun(start.body.id);
    const res = await request(api.app).get(`/api/v1/alarms?status=open&characteristicId=${t.characteristicId}`).set(await api.as('auditor'));
    const order = res.body.items.map((a: { rule: string; lot: { lotNumber: string } }) => `${a.lot.lotNumber.slice(-3)} ${a.rule}`);
    expect(order.slice(0, 2)).toEqual(['W24 out-of-spec', 'W24 we1']);
    expect(order.indexOf('W21 we1')).toBeGreaterThan(1);
    const lots = res.body.items.map((a: { lot: { lotNumber: string } }) => a.lot.lotNumber);
    // Together: once a lot's signals end, the lot does not come back further down.
    expect(lots.filter((l: string, i: number) => i > 0 && l !== lots[i - 1] && lots.slice(0, i - 1).includes(l))).toEqual([]);
  });
});

describe('acknowledging and closing', () => {
  it('lets a quality manager acknowledge with a note, then close; technicians may not; both land in the audit trail', async () => {
    const t = await characteristicWithSignal();
    const [alarm] = await api.db.select().from(alarms).where(and(eq(alarms.characteristicId, t.characteristicId), eq(alarms.rule, 'we1')));
    const url = `/api/v1/alarms/${alarm.id}`;
    expect((await request(api.app).post(`${url}/acknowledge`).set(await api.as('technician')).send({ note: 'Looked at it' })).status).toBe(403);
    const noNote = await request(api.app).post(`${url}/acknowledge`).set(await api.as('quality_manager')).send({});
    expect(noNote.status).toBe(400);
    const ack = await request(api.app).post(`${url}/acknowledge`).set(await api.as('quality_manager')).send({ note: 'Press platens checked; retest ordered' });
    expect(ack.status).toBe(200);
    expect(ack.body).toMatchObject({ status: 'acknowledged', acknowledgedBy: 'Demo Quality Manager', acknowledgeNote: 'Press platens checked; retest ordered' });
    expect((await request(api.app).post(`${url}/acknowledge`).set(await api.as('quality_manager')).send({ note: 'again' })).status).toBe(409);
    const listed = await request(api.app).get(`/api/v1/alarms?status=acknowledged&characteristicId=${t.characteristicId}`).set(await api.as('auditor'));
    expect(listed.body.items.map((a: { id: number }) => a.id)).toContain(alarm.id);
    const close = await request(api.app).post(`${url}/close`).set(await api.as('admin')).send({ note: 'Retest inside limits; cause was a chipped prism' });
    expect(close.body).toMatchObject({ status: 'closed', resolution: 'by-user', closedBy: 'Demo Administrator' });
    const trail = await api.db.select({ action: auditEvents.action, reason: auditEvents.reason }).from(auditEvents).where(and(eq(auditEvents.entity, 'alarm'), eq(auditEvents.entityId, String(alarm.id)))).orderBy(auditEvents.id);
    expect(trail).toEqual([
      { action: 'acknowledge', reason: 'Press platens checked; retest ordered' },
      { action: 'close', reason: 'Retest inside limits; cause was a chipped prism' },
    ]);

    // A run after a person closed it does not reopen or duplicate it.
    const again = await request(api.app).post('/api/v1/spc-runs').set(await api.as('quality_manager')).send({ characteristicIds: [t.characteristicId] });
    await api.waitForRun(again.body.id);
    const rows = await api.db.select().from(alarms).where(and(eq(alarms.characteristicId, t.characteristicId), eq(alarms.rule, 'we1'), eq(alarms.lotId, alarm.lotId)));
    expect(rows).toHaveLength(1);
    expect(rows[0].status).toBe('closed');
  });
});

describe('alarms from uploads', () => {
  it('raise an out-of-spec alarm before the upload answers, e-mail the subscriber, start an incremental run, and close it when the upload is voided', async () => {
    const t = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 2, specs: [{ lsl: 135, usl: 155, effectiveFrom: day(-10) }] });
    for (let i = 0; i < 21; i++) await t.addLot(`U${i}`, day(i), pair(i));
    const manager = await userIdByEmail(api.db, 'manager@harrowvale.example');
    await api.db.insert(alarmSubscriptions).values({ userId: manager, productId: t.productId, immediate: true, digest: false });

    // Produced an hour ago: a recent lot is e-mailed at once (older history goes to the digest only).
    const now = new Date(Date.now() - 3_600_000).toISOString();
    const csv = `${header}\n${t.productCode}-U21,${t.productCode},L1,${now},${t.code},131,1\n${t.productCode}-U21,${t.productCode},L1,${now},${t.code},132,2\n`;
    const up = await request(api.app).post('/api/v1/uploads').set(await api.as('technician')).attach('file', Buffer.from(csv), 'shift.csv');
    expect(up.status).toBe(201);
    const [oos] = await api.db.select().from(alarms).where(and(eq(alarms.characteristicId, t.characteristicId), eq(alarms.rule, 'out-of-spec')));
    expect(oos).toMatchObject({ source: 'ingest', status: 'open', statistic: 131.5, limitName: 'LSL', limitValue: 135, pointIndex: 21 });
    const [mail] = await api.db.select().from(mailOutbox).where(refersTo('alarmIds', [oos.id]));
    expect(mail).toMatchObject({ toAddress: 'manager@harrowvale.example', kind: 'alarm' });
    expect(mail.subject).toBe(`Prismline alarm: lot ${t.lotNumber('U21')} — Out of specification (${t.code})`);

    const run = await eventually(async () => {
      const [r] = await api.db.select().from(spcRuns).where(and(eq(spcRuns.trigger, 'upload'), sql`${spcRuns.id} in (select run_id from spc_run_items where characteristic_id = ${t.characteristicId})`));
      return r;
    }, 10_000, 'the incremental run after the upload');
    expect(run.kind).toBe('incremental');
    expect((await api.waitForRun(run.id)).status).toBe('succeeded');
    expect(await api.db.select().from(alarms).where(and(eq(alarms.characteristicId, t.characteristicId), eq(alarms.rule, 'out-of-spec')))).toHaveLength(1);

    const voided = await request(api.app).post(`/api/v1/uploads/${up.body.id}/void`).set(await api.as('quality_manager')).send({ reason: 'Wrong water dose at mixing' });
    expect(voided.status).toBe(200);
    const closed = await eventually(async () => {
      const [a] = await api.db.select().from(alarms).where(eq(alarms.id, oos.id));
      return a.status === 'closed' ? a : undefined;
    }, 20_000, 'the alarm to close after the void');
    expect(closed.resolution).toBe('data-changed');
  });
});
