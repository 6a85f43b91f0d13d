import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { alarms, alarmSubscriptions, auditEvents, mailOutbox, pointExclusions, spcRuns } from '@api/db/schema';
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

const as = (role: Parameters<typeof api.as>[0]) => api.as(role);
const patch = async (id: number, role: Parameters<typeof api.as>[0], body: object) => request(api.app).patch(`/api/v1/alarms/${id}`).set(await as(role)).send(body);
async function we1Of(t: { characteristicId: number }) {
  const [a] = await api.db.select().from(alarms).where(and(eq(alarms.characteristicId, t.characteristicId), eq(alarms.rule, 'we1')));
  return a;
}
const trailOf = (id: number) =>
  api.db.select({ action: auditEvents.action, reason: auditEvents.reason, actorId: auditEvents.actorId }).from(auditEvents).where(and(eq(auditEvents.entity, 'alarm'), eq(auditEvents.entityId, String(id)))).orderBy(auditEvents.id);
const mailOf = (id: number, kind: string) => api.db.select().from(mailOutbox).where(and(refersTo('alarmIds', [id]), eq(mailOutbox.kind, kind as never))).orderBy(mailOutbox.id);

describe('the status flow of an alarm', () => {
  it('goes open → acknowledged → investigating → closed with an outcome, and back to open with a reason; each step audited', async () => {
    const t = await characteristicWithSignal();
    const alarm = await we1Of(t);
    const ack = await patch(alarm.id, 'quality_manager', { status: 'acknowledged', note: 'Press platens checked; retest ordered' });
    expect(ack.status).toBe(200);
    expect(ack.body).toMatchObject({ status: 'acknowledged', acknowledgedBy: 'Demo Quality Manager', acknowledgeNote: 'Press platens checked; retest ordered', nextSteps: ['investigating', 'closed'] });
    const inv = await patch(alarm.id, 'admin', { status: 'investigating' });
    expect(inv.body).toMatchObject({ status: 'investigating', investigatingBy: 'Demo Administrator', nextSteps: ['closed'] });
    const closed = await patch(alarm.id, 'quality_manager', { status: 'closed', outcome: 'assignable-cause', causeCategory: 'measurement', note: 'Chipped prism on the flow table' });
    expect(closed.status).toBe(200);
    expect(closed.body).toMatchObject({ status: 'closed', resolution: 'by-user', outcome: 'assignable-cause', causeCategory: 'measurement', closeNote: 'Chipped prism on the flow table', closedBy: 'Demo Quality Manager', nextSteps: ['open'] });
    const reopened = await patch(alarm.id, 'quality_manager', { status: 'open', note: 'Retest after the new prism shows the same flow' });
    expect(reopened.body).toMatchObject({ status: 'open', outcome: null, causeCategory: null, closedAt: null, reopenedBy: 'Demo Quality Manager', reopenReason: 'Retest after the new prism shows the same flow' });
    expect((await trailOf(alarm.id)).map((e) => e.action)).toEqual(['acknowledge', 'investigate', 'close', 'reopen']);
    // The history of the detail page is that trail.
    const detail = await request(api.app).get(`/api/v1/alarms/${alarm.id}`).set(await as('auditor'));
    expect(detail.body.history.map((h: { action: string }) => h.action)).toEqual(['acknowledge', 'investigate', 'close', 'reopen']);
    expect(detail.body.history[2]).toMatchObject({ actor: 'Demo Quality Manager', reason: 'Chipped prism on the flow table' });
    expect(detail.body).toMatchObject({ lotStatus: 'released', ncrs: [], comments: [], group: null });
  });

  it('refuses a step the flow does not allow with 409 naming the allowed ones', async () => {
    const t = await characteristicWithSignal();
    const alarm = await we1Of(t);
    const skip = await patch(alarm.id, 'quality_manager', { status: 'investigating' });
    expect(skip.status).toBe(409);
    expect(skip.body.error).toMatch(/open: it can go to acknowledged or closed only/);
    expect(skip.body.details).toEqual([{ path: 'status', message: 'Allowed next: acknowledged, closed' }]);
    expect((await patch(alarm.id, 'quality_manager', { status: 'open', note: 'again please' })).status).toBe(409);
    await patch(alarm.id, 'quality_manager', { status: 'acknowledged' });
    expect((await patch(alarm.id, 'quality_manager', { status: 'acknowledged' })).status).toBe(409);
    await patch(alarm.id, 'quality_manager', { status: 'investigating' });
    const back = await patch(alarm.id, 'quality_manager', { status: 'acknowledged' });
    expect(back.status).toBe(409);
    expect(back.body.details[0].message).toBe('Allowed next: closed');
    await patch(alarm.id, 'quality_manager', { status: 'closed', outcome: 'false-alarm', note: 'Typing error, value re-entered' });
    for (const status of ['acknowledged', 'investigating', 'closed']) {
      const res = await patch(alarm.id, 'quality_manager', { status, ...(status === 'closed' ? { outcome: 'no-cause', note: 'nothing' } : {}) });
      expect(res.status, status).toBe(409);
      expect(res.body.details).toEqual([{ path: 'status', message: 'Allowed next: open' }]);
    }
  });

  it('closes only with an outcome, an assignable cause only with its category, and reopens only with a reason', async () => {
    const t = await characteristicWithSignal();
    const alarm = await we1Of(t);
    const noOutcome = await patch(alarm.id, 'quality_manager', { status: 'closed', note: 'Looked at it' });
    expect(noOutcome.status).toBe(400);
    expect(noOutcome.body.details).toEqual([{ path: 'outcome', message: expect.stringMatching(/assignable cause, no cause, or a false alarm/) }]);
    const noCategory = await patch(alarm.id, 'quality_manager', { status: 'closed', outcome: 'assignable-cause', note: 'New sand delivery' });
    expect(noCategory.status).toBe(400);
    expect(noCategory.body.details[0].path).toBe('causeCategory');
    const badCategory = await patch(alarm.id, 'quality_manager', { status: 'closed', outcome: 'assignable-cause', causeCategory: 'weather', note: 'New sand delivery' });
    expect(badCategory.status).toBe(400);
    const noNote = await patch(alarm.id, 'quality_manager', { status: 'closed', outcome: 'no-cause' });
    expect(noNote.status).toBe(400);
    expect(noNote.body.details[0].path).toBe('note');
    expect((await api.db.select().from(alarms).where(eq(alarms.id, alarm.id)))[0].status).toBe('open');
    await patch(alarm.id, 'quality_manager', { status: 'closed', outcome: 'no-cause', note: 'Retest inside the limits' });
    const noReason = await patch(alarm.id, 'quality_manager', { status: 'open' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.details[0].path).toBe('note');
  });

  it('refuses every triage write to the technician and the auditor (403), who still read the alarm', async () => {
    const t = await characteristicWithSignal();
    const alarm = await we1Of(t);
    for (const role of ['technician', 'auditor'] as const) {
      expect((await patch(alarm.id, role, { status: 'acknowledged' })).status, role).toBe(403);
      expect((await request(api.app).post(`/api/v1/alarms/${alarm.id}/comments`).set(await as(role)).send({ body: 'Seen' })).status, role).toBe(403);
      expect((await request(api.app).post('/api/v1/alarms/acknowledge').set(await as(role)).send({ ids: [alarm.id] })).status, role).toBe(403);
      expect((await request(api.app).post('/api/v1/alarm-groups').set(await as(role)).send({ title: 'Sand', alarmIds: [alarm.id] })).status, role).toBe(403);
      expect((await request(api.app).get(`/api/v1/alarms/${alarm.id}`).set(await as(role))).status, role).toBe(200);
    }
    expect((await api.db.select().from(alarms).where(eq(alarms.id, alarm.id)))[0].status).toBe('open');
  });

  it('refuses bad input with 400: a NUL in the note, an id beyond the integer column, an unknown field', async () => {
    const t = await characteristicWithSignal();
    const alarm = await we1Of(t);
    const nul = await patch(alarm.id, 'quality_manager', { status: 'acknowledged', note: 'pla\u0000ten' });
    expect(nul.status).toBe(400);
    expect(nul.body.details[0]).toMatchObject({ path: 'note', message: 'A note may not contain control characters' });
    expect((await request(api.app).patch('/api/v1/alarms/2147483648').set(await as('quality_manager')).send({ status: 'acknowledged' })).status).toBe(400);
    expect((await request(api.app).get('/api/v1/alarms/2147483648').set(await as('auditor'))).status).toBe(400);
    expect((await patch(alarm.id, 'quality_manager', { assigneeId: 2147483648 })).status).toBe(400);
    expect((await patch(alarm.id, 'quality_manager', { status: 'acknowledged', colour: 'red' })).status).toBe(400);
    expect((await patch(alarm.id, 'quality_manager', {})).status).toBe(400);
    const comment = await request(api.app).post(`/api/v1/alarms/${alarm.id}/comments`).set(await as('quality_manager')).send({ body: 'a\u0000b' });
    expect(comment.status).toBe(400);
    expect((await request(api.app).get('/api/v1/alarms?assignee=2147483648').set(await as('auditor'))).status).toBe(400);
  });
});

describe('closing with an assignable cause', () => {
  it('leaves the point out of the limit estimate through the exclusion path, with the closing note as its reason, and runs the chart again', async () => {
    const t = await characteristicWithSignal();
    const alarm = await we1Of(t);
    const note = 'Wrong water dose at mixing, lot reworked';
    const res = await patch(alarm.id, 'quality_manager', { status: 'closed', outcome: 'assignable-cause', causeCategory: 'method', note, excludePoints: true });
    expect(res.status).toBe(200);
    const [ex] = await api.db.select().from(pointExclusions).where(and(eq(pointExclusions.characteristicId, t.characteristicId), eq(pointExclusions.lotId, alarm.lotId)));
    expect(ex).toMatchObject({ reason: note, removedAt: null });
    const [audit] = await api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'characteristic'), eq(auditEvents.entityId, String(t.characteristicId)), eq(auditEvents.action, 'exclude point')));
    expect(audit.reason).toBe(note);
    // The incremental run after commit charts the point as excluded.
    await eventually(async () => {
      const chart = await request(api.app).get(`/api/v1/characteristics/${t.characteristicId}/chart`).set(await as('auditor'));
      return chart.body.points?.[22]?.excluded ? true : undefined;
    }, 20_000, 'the chart to show the excluded point');
    const noCause = await characteristicWithSignal();
    const other = await we1Of(noCause);
    const refused = await patch(other.id, 'quality_manager', { status: 'closed', outcome: 'no-cause', note: 'Nothing found', excludePoints: true });
    expect(refused.status).toBe(400);
    expect(refused.body.details[0].path).toBe('excludePoints');
  });
});

describe('assignee, comments, reopening mail', () => {
  it('mails the new assignee, filters by assignee (me, nobody, a user), and mails subscribers and assignee again at every reopening', async () => {
    const t = await characteristicWithSignal();
    const alarm = await we1Of(t);
    const technician = await userIdByEmail(api.db, 'technician@harrowvale.example');
    const manager = await userIdByEmail(api.db, 'manager@harrowvale.example');
    await api.db.insert(alarmSubscriptions).values({ userId: manager, productId: t.productId, immediate: true, digest: false });

    const assigned = await patch(alarm.id, 'quality_manager', { assigneeId: technician, note: 'Please retest the retained sample' });
    expect(assigned.body.assignee).toEqual({ id: technician, name: 'Demo Technician' });
    const [mail] = await mailOf(alarm.id, 'alarm-assigned');
    expect(mail).toMatchObject({ toAddress: 'technician@harrowvale.example', subject: `Prismline alarm assigned to you: lot ${t.lotNumber('A22')} — Beyond a control limit (${t.code})` });
    expect(mail.textBody).toContain(`Alarm: ${TEST_PUBLIC_URL}/alarms/${alarm.id}`);
    expect(mail.textBody).toContain(`Chart: ${TEST_PUBLIC_URL}/charts/${t.characteristicId}?lot=${t.lotNumber('A22')}`);
    expect(mail.textBody).toContain('Note: Please retest the retained sample');

    const mine = await request(api.app).get(`/api/v1/alarms?assignee=me&characteristicId=${t.characteristicId}`).set(await as('technician'));
    expect(mine.body.items.map((a: { id: number }) => a.id)).toEqual([alarm.id]);
    const byId = await request(api.app).get(`/api/v1/alarms?assignee=${technician}&characteristicId=${t.characteristicId}`).set(await as('auditor'));
    expect(byId.body.items.map((a: { id: number }) => a.id)).toEqual([alarm.id]);
    const nobody = await request(api.app).get(`/api/v1/alarms?assignee=nobody&characteristicId=${t.characteristicId}`).set(await as('auditor'));
    expect(nobody.body.items.map((a: { id: number }) => a.id)).not.toContain(alarm.id);
    const unassigned = await patch(alarm.id, 'quality_manager', { assigneeId: null });
    expect(unassigned.body.assignee).toBeNull();
    expect((await request(api.app).get(`/api/v1/alarms?assignee=nobody&characteristicId=${t.characteristicId}`).set(await as('auditor'))).body.items.map((a: { id: number }) => a.id)).toContain(alarm.id);
    expect((await patch(alarm.id, 'quality_manager', { assigneeId: 999_999 })).status).toBe(400);
    await patch(alarm.id, 'quality_manager', { assigneeId: technician });
    expect(await mailOf(alarm.id, 'alarm-assigned')).toHaveLength(2);

    const comment = await request(api.app).post(`/api/v1/alarms/${alarm.id}/comments`).set(await as('quality_manager')).send({ body: 'Sample retained in the lab store, shelf 3' });
    expect(comment.status).toBe(201);
    expect(comment.body.comments).toEqual([{ id: expect.any(Number), author: 'Demo Quality Manager', body: 'Sample retained in the lab store, shelf 3', createdAt: expect.any(String) }]);

    await patch(alarm.id, 'quality_manager', { status: 'closed', outcome: 'no-cause', note: 'Retest inside the limits' });
    expect(await mailOf(alarm.id, 'alarm-reopened')).toHaveLength(0);
    await patch(alarm.id, 'quality_manager', { status: 'open', note: 'The next lot shows the same flow' });
    const first = await mailOf(alarm.id, 'alarm-reopened');
    expect(first.map((m) => m.toAddress).sort()).toEqual(['manager@harrowvale.example', 'technician@harrowvale.example']);
    expect(first[0].subject).toBe(`Prismline alarm reopened: lot ${t.lotNumber('A22')} — Beyond a control limit (${t.code})`);
    expect(first[0].textBody).toContain('Why: The next lot shows the same flow');
    await patch(alarm.id, 'quality_manager', { status: 'closed', outcome: 'false-alarm', note: 'Mix-up of samples' });
    await patch(alarm.id, 'admin', { status: 'open', note: 'Samples were not mixed up after all' });
    expect(await mailOf(alarm.id, 'alarm-reopened')).toHaveLength(4);
    expect((await trailOf(alarm.id)).map((e) => e.action)).toEqual(['assign', 'assign', 'assign', 'comment', 'close', 'reopen', 'close', 'reopen']);
  });
});

describe('investigations and bulk acknowledge', () => {
  it('groups alarms of several characteristics under one investigation, shown on each alarm', async () => {
    const a = await we1Of(await characteristicWithSignal());
    const b = await we1Of(await characteristicWithSignal());
    const res = await request(api.app).post('/api/v1/alarm-groups').set(await as('quality_manager')).send({ title: 'Sand delivery of Monday', note: 'Finer grading than usual', alarmIds: [a.id, b.id] });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ title: 'Sand delivery of Monday', note: 'Finer grading than usual', createdBy: 'Demo Quality Manager' });
    expect(res.body.members.map((m: { id: number }) => m.id)).toEqual([a.id, b.id]);
    const detail = await request(api.app).get(`/api/v1/alarms/${b.id}`).set(await as('technician'));
    expect(detail.body.group).toMatchObject({ id: res.body.id, title: 'Sand delivery of Monday', members: [expect.objectContaining({ id: a.id, signal: 'Beyond a control limit' }), expect.objectContaining({ id: b.id })] });
    const [created] = await api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'alarm group'), eq(auditEvents.entityId, String(res.body.id))));
    expect(created.action).toBe('create');
    const out = await patch(a.id, 'quality_manager', { groupId: null });
    expect(out.body.group).toBeNull();
    expect((await request(api.app).post('/api/v1/alarm-groups').set(await as('quality_manager')).send({ title: 'x', alarmIds: [a.id] })).status).toBe(400);
    expect((await request(api.app).post('/api/v1/alarm-groups').set(await as('quality_manager')).send({ title: 'Sand again', alarmIds: [2147483647] })).status).toBe(400);
  });

  it('acknowledges the open alarms of a selection at once, names the others, and bounds the selection', async () => {
    const a = await we1Of(await characteristicWithSignal());
    const b = await we1Of(await characteristicWithSignal());
    await patch(b.id, 'quality_manager', { status: 'closed', outcome: 'false-alarm', note: 'Typing error' });
    const res = await request(api.app).post('/api/v1/alarms/acknowledge').set(await as('quality_manager')).send({ ids: [a.id, b.id], note: 'Seen at the morning meeting' });
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ acknowledged: [a.id], skipped: [b.id] });
    const [row] = await api.db.select().from(alarms).where(eq(alarms.id, a.id));
    expect(row).toMatchObject({ status: 'acknowledged', acknowledgeNote: 'Seen at the morning meeting' });
    expect((await trailOf(a.id)).map((e) => e.action)).toEqual(['acknowledge']);
    const tooMany = await request(api.app).post('/api/v1/alarms/acknowledge').set(await as('quality_manager')).send({ ids: Array.from({ length: 501 }, (_, i) => i + 1) });
    expect(tooMany.status).toBe(400);
    expect(tooMany.body.error).toMatch(/at most 500/);
    expect((await request(api.app).post('/api/v1/alarms/acknowledge').set(await as('quality_manager')).send({ ids: [] })).status).toBe(400);
  });
});

describe('the inbox filters', () => {
  it('filters by line, product, rule and age and counts the statuses of the same filter', async () => {
    const t = await characteristicWithSignal();
    const [line] = await api.db.execute<{ line_id: number }>(sql`select line_id from products where id = ${t.productId}`).then((r) => r.rows);
    const get = async (q: string) => (await request(api.app).get(`/api/v1/alarms?${q}`).set(await as('auditor'))).body;
    const byProduct = await get(`productId=${t.productId}`);
    expect(byProduct.items.length).toBeGreaterThan(0);
    expect(byProduct.items.every((a: { characteristic: { productCode: string } }) => a.characteristic.productCode === t.productCode)).toBe(true);
    expect(Object.values(byProduct.counts).reduce((n: number, c) => n + (c as number), 0)).toBe(byProduct.items.length);
    expect((await get(`productId=${t.productId}&rule=we1`)).items.map((a: { rule: string }) => a.rule)).toEqual(['we1']);
    expect((await get(`productId=${t.productId}&rule=out-of-spec`)).items).toEqual([]);
    expect((await get(`productId=${t.productId}&lineId=${line.line_id}`)).items.length).toBe(byProduct.items.length);
    // Detected just now: none is a day old yet.
    expect((await get(`productId=${t.productId}&olderThanDays=1`)).items).toEqual([]);
    expect((await get(`productId=${t.productId}&newerThanDays=1`)).items.length).toBe(byProduct.items.length);
    const oldest = await get(`productId=${t.productId}&sort=oldest`);
    expect(oldest.items.map((a: { id: number }) => a.id)).toEqual([...oldest.items.map((a: { id: number }) => a.id)].sort((x: number, y: number) => x - y));
    expect((await request(api.app).get('/api/v1/alarms?status=paused').set(await as('auditor'))).status).toBe(400);
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
