// The NCR API against the real test database: numbering, the state flow per role, closing blockers,
// dispositions and lot status, actions, attachments and the e-mails of each occasion. Test data is built
// through the API on invented test products (tests/support/plant.ts) and removed afterwards.
import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { createApp } from '@api/app';
import { createDatabase } from '@api/db/client';
import { databaseUrl, demoEmail, demoTokens, TEST_JWT_SECRET } from '@tests/support/api';
import { createTestCharacteristic, removeTestCharacteristics, testDay, testPair, userIdByEmail, type TestCharacteristic } from '@tests/support/plant';
import type { NcrActionDue, NcrList, NcrStatus, NcrView } from '@shared/schemas/ncrs';
import type { Role } from '@shared/schemas/roles';
import { plantDay } from '@shared/time';

const PUBLIC_URL = 'http://prismline.test';
const db = createDatabase(databaseUrl(), 6);
const app = createApp({ db, config: { jwtSecret: TEST_JWT_SECRET, loginAttemptsPer15Min: 50 }, serveWeb: false, publicUrl: PUBLIC_URL });
const tokenFor = demoTokens(app);
const as = async (role: Role) => ({ authorization: `Bearer ${await tokenFor(role)}` });

let t: TestCharacteristic;
let other: TestCharacteristic;
let timeZone: string;
const created: number[] = [];
const lot = (i: number) => t.lotNumber(`N${i}`);
const ids: Record<'technician' | 'manager' | 'auditor', number> = { technician: 0, manager: 0, auditor: 0 };

beforeAll(async () => {
  t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
  other = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
  for (let i = 1; i <= 12; i++) await t.addLot(`N${i}`, testDay(i), testPair(i));
  const plant = await db.execute<{ time_zone: string }>(sql`select time_zone from plants order by id limit 1`);
  timeZone = plant.rows[0].time_zone;
  ids.technician = await userIdByEmail(db, demoEmail.technician);
  ids.manager = await userIdByEmail(db, demoEmail.quality_manager);
  ids.auditor = await userIdByEmail(db, demoEmail.auditor);
});

afterAll(async () => {
  const mine = sql.param(created);
  await db.transaction(async (tx) => {
    await tx.execute(sql`delete from lot_holds where ncr_id = any(${mine}::int[]) or lot_id in (select id from lots where product_id = ${t.productId})`);
    for (const table of ['ncr_attachments', 'ncr_actions', 'ncr_alarms', 'ncr_lots']) await tx.execute(sql`delete from ${sql.identifier(table)} where ncr_id = any(${mine}::int[])`);
    await tx.execute(sql`delete from ncrs where id = any(${mine}::int[])`);
  });
  await removeTestCharacteristics(db);
  await db.$client.end();
});

const baseNcr = { title: 'Flow below specification on test lots', description: 'Flow diameter of the early test below the lower limit on two lots.', severity: 'major' };

async function raise(body: object, role: Role = 'quality_manager') {
  const res = await request(app).post('/api/v1/ncrs').set(await as(role)).send({ ...baseNcr, ...body });
  if (res.status === 201) created.push(res.body.id);
  return res;
}
const get = async (id: number): Promise<NcrView> => (await request(app).get(`/api/v1/ncrs/${id}`).set(await as('auditor'))).body;
const patch = async (id: number, body: object, role: Role = 'quality_manager') => request(app).patch(`/api/v1/ncrs/${id}`).set(await as(role)).send(body);
const step = async (id: number, to: NcrStatus, reason?: string, role: Role = 'quality_manager') =>
  request(app).post(`/api/v1/ncrs/${id}/transitions`).set(await as(role)).send(reason ? { to, reason } : { to });
const addAction = async (id: number, body: object, role: Role = 'quality_manager') =>
  request(app).post(`/api/v1/ncrs/${id}/actions`).set(await as(role)).send({ kind: 'corrective', description: 'Recalibrate the flow table', ownerId: ids.technician, ...body });

/** A plant calendar day `n` days from today at the plant. */
const plantDayFromToday = (n: number) => {
  const today = plantDay(new Date(), timeZone);
  const d = new Date(`${today}T12:00:00Z`);
  d.setUTCDate(d.getUTCDate() + n);
  return d.toISOString().slice(0, 10);
};

/** An NCR on one lot in actions pending with everything closing asks for done. */
async function readyToClose(lotIndex = 12): Promise<number> {
  const { body } = await raise({ lots: [{ lotNumber: lot(lotIndex), quantityT: 12.5 }] });
  const id = body.id as number;
  expect((await step(id, 'investigating')).status).toBe(200);
  const action = await addAction(id, { dueDate: plantDayFromToday(3) });
  const actionId = action.body.actions[0].id as number;
  expect((await request(app).patch(`/api/v1/ncrs/${id}/actions/${actionId}`).set(await as('technician')).send({ doneDate: plantDayFromToday(0), evidence: 'Calibration certificate filed' })).status).toBe(200);
  const filled = await patch(id, {
    rootCauseCategory: 'measurement',
    rootCauseAnalysis: 'The flow table was out of level after the move.',
    dispositions: [{ lotNumber: lot(lotIndex), disposition: 'release', note: 'Retest within specification' }],
    approve: { note: 'Agreed' },
    effectivenessCheck: 'Ten lots since the recalibration within limits.',
    effective: true,
  });
  expect(filled.status, JSON.stringify(filled.body)).toBe(200);
  expect((await step(id, 'actions-pending')).status).toBe(200);
  return id;
}

describe('raising an NCR', () => {
  it('lets a technician raise one from a lot, numbered NCR-<plant year>-<4 digits>, with the lots contained on hold', async () => {
    const res = await raise({ lots: [{ lotNumber: lot(1), quantityT: 20 }, { lotNumber: lot(2) }], holdLots: true }, 'technician');
    expect(res.status).toBe(201);
    const v = res.body as NcrView;
    // The year at the plant (Intl's IANA zone data, independent of date-fns).
    const year = new Intl.DateTimeFormat('en-GB', { timeZone, year: 'numeric' }).format(new Date());
    expect(v.number).toMatch(new RegExp(`^NCR-${year}-\\d{4}$`));
    const technician = await db.execute<{ name: string }>(sql`select name from users where id = ${ids.technician}`);
    expect(v).toMatchObject({ status: 'open', raisedFrom: 'lot', severity: 'major', product: { id: t.productId, code: t.productCode }, createdBy: technician.rows[0].name, assignee: null });
    expect(v.lots.map((l) => [l.lotNumber, l.quantityT, l.lotStatus, l.hold?.source, l.hold?.ncr?.number])).toEqual([
      [lot(1), 20, 'on-hold', 'ncr', v.number],
      [lot(2), null, 'on-hold', 'ncr', v.number],
    ]);
    expect(v.allowedTransitions).toEqual(['investigating']);
    expect(v.history.map((h) => h.action)).toEqual(['raise']);
    expect(v.history[0].summary).toBe(`Raised ${v.number} from a lot, severity major.`);
    const holds = await db.execute<{ n: number }>(sql`select count(*)::int as n from audit_events where entity = 'lot' and action = 'hold' and entity_id = any(${sql.param([lot(1), lot(2)])}::text[]) and after ->> 'ncrId' = ${String(v.id)}`);
    expect(holds.rows[0].n).toBe(2);
  });

  it('raises one from alarms with the alarms’ lots, and one directly', async () => {
    const alarm = await db.execute<{ id: number; lot_number: string; characteristic_id: number }>(sql`select a.id, l.lot_number, a.characteristic_id from alarms a join lots l on l.id = a.lot_id order by a.id limit 1`);
    const a = alarm.rows[0];
    const res = await raise({ alarmIds: [a.id] });
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ raisedFrom: 'alarms', alarms: [{ id: a.id, lotNumber: a.lot_number, chartUrl: `${PUBLIC_URL}/charts/${a.characteristic_id}?lot=${encodeURIComponent(a.lot_number)}` }] });
    expect(res.body.lots.map((l: { lotNumber: string; lotStatus: string }) => l.lotNumber)).toEqual([a.lot_number]);
    const direct = await raise({});
    expect(direct.status).toBe(201);
    expect(direct.body).toMatchObject({ raisedFrom: 'direct', product: null, lots: [], alarms: [] });
  });

  it('gives ten NCRs raised at once ten distinct consecutive numbers', async () => {
    const answers = await Promise.all(Array.from({ length: 10 }, (_, i) => raise({ title: `Concurrent raise number ${i}` })));
    expect(answers.map((r) => r.status)).toEqual(Array(10).fill(201));
    const sequences = answers.map((r) => Number((r.body as NcrView).number.slice(-4))).sort((x, y) => x - y);
    expect(new Set(sequences).size).toBe(10);
    expect(sequences[9] - sequences[0]).toBe(9);
  });

  it('takes no number for a refused raise (an unknown lot, an unknown alarm): the next one follows without a gap', async () => {
    const first = await raise({});
    const unknownLot = await raise({ lots: [{ lotNumber: 'NO-SUCH-LOT-77' }] });
    expect(unknownLot.status).toBe(404);
    expect(unknownLot.body.error).toBe('Lot NO-SUCH-LOT-77 not found');
    // Named under the lot's own field, so the form shows it there.
    expect(unknownLot.body.details).toEqual([{ path: 'lots.0.lotNumber', message: 'Lot NO-SUCH-LOT-77 not found' }]);
    const unknownAlarm = await raise({ alarmIds: [2_000_000_000] });
    expect(unknownAlarm.status).toBe(404);
    const next = await raise({});
    expect(Number(next.body.number.slice(-4))).toBe(Number(first.body.number.slice(-4)) + 1);
  });

  it('refuses bad input with a plain 400, never a 500', async () => {
    for (const body of [{ title: 'Nul\u0000 in the title' }, { severity: 'huge' }, { alarmIds: [3_000_000_000] }, { lots: [{ lotNumber: lot(1), quantityT: -2 }] }, { productId: 'x' }]) {
      const res = await raise(body);
      expect(res.status, JSON.stringify(body)).toBe(400);
      expect(typeof res.body.error).toBe('string');
    }
    for (const path of ['/api/v1/ncrs/abc', '/api/v1/ncrs/3000000000', '/api/v1/ncrs/1/attachments/0']) expect((await request(app).get(path).set(await as('auditor'))).status).toBe(400);
    expect((await request(app).get('/api/v1/ncrs/2000000000').set(await as('auditor'))).status).toBe(404);
  });

  it('lets only managers assign: a technician naming an assignee gets 403, the auditor may not raise', async () => {
    expect((await raise({ assigneeId: ids.technician }, 'technician')).status).toBe(403);
    expect((await raise({}, 'auditor')).status).toBe(403);
  });
});

describe('the state flow', () => {
  // The contract's flow (issue #14), written out here independently of shared/schemas/ncrs.ts.
  const flow: Record<NcrStatus, NcrStatus[]> = { open: ['investigating'], investigating: ['actions-pending'], 'actions-pending': ['investigating', 'closed'], closed: ['open'] };
  const all: NcrStatus[] = ['open', 'investigating', 'actions-pending', 'closed'];

  async function ncrIn(state: NcrStatus): Promise<number> {
    if (state === 'open') return (await raise({})).body.id;
    if (state === 'investigating') {
      const id = (await raise({})).body.id;
      await step(id, 'investigating');
      return id;
    }
    const id = await readyToClose();
    if (state === 'closed') expect((await step(id, 'closed')).status).toBe(200);
    return id;
  }

  it.each(all)('refuses from %s every state the flow does not allow, with 409 naming the allowed next states', async (from) => {
    const id = await ncrIn(from);
    for (const to of all.filter((s) => !flow[from].includes(s))) {
      const res = await step(id, to, 'A reason that is long enough');
      expect(res.status, `${from} → ${to}`).toBe(409);
      expect(res.body.details).toEqual(flow[from].map((s) => ({ path: 'to', message: s })));
    }
    expect((await get(id)).status).toBe(from);
  });

  it('allows every step of the flow, a reason where one is needed, with who and when in the history', async () => {
    const open = await ncrIn('open');
    expect((await step(open, 'investigating')).body.status).toBe('investigating');
    expect((await step(open, 'actions-pending')).body.status).toBe('actions-pending');
    expect((await step(open, 'investigating')).status).toBe(400);
    const back = await step(open, 'investigating', 'Root cause was the wrong sand');
    expect(back.status).toBe(200);
    expect(back.body.history.at(-1)).toMatchObject({ action: 'transition', summary: 'Moved from Actions pending to Investigating.', reason: 'Root cause was the wrong sand', actor: expect.any(String) });

    const ready = await ncrIn('actions-pending');
    const closed = await step(ready, 'closed');
    expect(closed.status).toBe(200);
    expect(closed.body).toMatchObject({ status: 'closed', closedBy: expect.any(String), closingBlockers: [] });
    expect(closed.body.closedAt).not.toBeNull();
    const noReason = await step(ready, 'open');
    expect(noReason.status).toBe(400);
    expect(noReason.body.details).toEqual([{ path: 'reason', message: 'Say why the NCR is reopened' }]);
    const reopened = await step(ready, 'open', 'Flow low again on the next lot');
    expect(reopened.status).toBe(200);
    // Reopened: the next closing is decided afresh.
    expect(reopened.body).toMatchObject({ status: 'open', closedAt: null, closedBy: null, approvedAt: null, effective: null, effectivenessCheck: null });
    const times = reopened.body.history.map((h: { at: string }) => h.at);
    expect([...times].sort()).toEqual(times);
  });

  it('refuses every write to the technician beyond raising and evidence (403) and every write to the auditor', async () => {
    const id = await ncrIn('open');
    for (const role of ['technician', 'auditor'] as const) {
      expect((await step(id, 'investigating', undefined, role)).status).toBe(403);
      expect((await patch(id, { approve: { note: 'Approved by me' } }, role)).status).toBe(403);
      expect((await patch(id, { dispositions: [{ lotNumber: lot(1), disposition: 'release', note: 'Fine as it is' }] }, role)).status).toBe(403);
      expect((await addAction(id, { dueDate: plantDayFromToday(1) }, role)).status).toBe(403);
    }
    expect((await request(app).post(`/api/v1/ncrs/${id}/attachments`).set(await as('auditor')).attach('file', Buffer.from('a,b\n1,2\n'), 'x.csv')).status).toBe(403);
    expect((await request(app).patch(`/api/v1/ncrs/${id}/actions/1`).set(await as('auditor')).send({ evidence: 'x' })).status).toBe(403);
    expect((await get(id)).history.map((h) => h.action)).toEqual(['raise']);
  });
});

describe('closing', () => {
  it('names what is missing, in the view and in the 409 of closing, until everything is there', async () => {
    const { body } = await raise({ lots: [{ lotNumber: lot(11) }] });
    const id = body.id as number;
    await step(id, 'investigating');
    const withAction = await addAction(id, { description: 'Level the flow table', dueDate: plantDayFromToday(5) });
    const actionId = withAction.body.actions[0].id;
    await step(id, 'actions-pending');
    let v = await get(id);
    expect(v.closingBlockers).toEqual([
      'Choose the root cause category.',
      'Write the root-cause analysis.',
      `Decide the disposition of lot ${lot(11)}.`,
      `One action is not done yet: #${actionId} “Level the flow table”.`,
      'A quality manager has not approved it yet.',
      'Record the effectiveness check of the actions.',
    ]);
    const refused = await step(id, 'closed');
    expect(refused.status).toBe(409);
    expect(refused.body.details.map((d: { message: string }) => d.message)).toEqual(v.closingBlockers);

    await patch(id, { rootCauseCategory: 'machine', rootCauseAnalysis: 'Table out of level.', effectivenessCheck: 'Five lots checked after levelling.', effective: false });
    v = await get(id);
    expect(v.closingBlockers).toEqual([
      `Decide the disposition of lot ${lot(11)}.`,
      `One action is not done yet: #${actionId} “Level the flow table”.`,
      'A quality manager has not approved it yet.',
      'The effectiveness check has not found the actions effective.',
    ]);
    await patch(id, { effective: true, approve: { note: 'Root cause agreed' }, dispositions: [{ lotNumber: lot(11), disposition: 'release', note: 'Retested within specification' }] });
    await request(app).patch(`/api/v1/ncrs/${id}/actions/${actionId}`).set(await as('technician')).send({ doneDate: plantDayFromToday(0) });
    v = await get(id);
    expect(v.closingBlockers).toEqual([]);
    expect((await step(id, 'closed')).status).toBe(200);
    // A closed NCR is not edited until reopened.
    expect((await patch(id, { title: 'A different title now' })).status).toBe(409);
  });
});

describe('dispositions', () => {
  it('moves each lot’s status as decided: release and downgrade release it, rework keeps it on hold, scrap rejects it', async () => {
    const lots = [3, 4, 5, 6].map((i) => ({ lotNumber: lot(i), quantityT: 10 }));
    const { body } = await raise({ lots, holdLots: true });
    const id = body.id as number;
    expect((await patch(id, { dispositions: [{ lotNumber: lot(5), disposition: 'downgrade', note: 'Sell as lower class' }] })).status).toBe(400);
    expect((await patch(id, { dispositions: [{ lotNumber: lot(5), disposition: 'downgrade', downgradeProductId: t.productId, note: 'Sell as lower class' }] })).status).toBe(400);
    const res = await patch(id, {
      dispositions: [
        { lotNumber: lot(3), disposition: 'release', note: 'Retest within specification' },
        { lotNumber: lot(4), disposition: 'rework', note: 'Remix with fresh binder' },
        { lotNumber: lot(5), disposition: 'downgrade', downgradeProductId: other.productId, note: 'Sell as lower class' },
        { lotNumber: lot(6), disposition: 'scrap', note: 'Strength far below specification' },
      ],
    });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    const v = res.body as NcrView;
    expect(v.lots.map((l) => [l.lotNumber, l.disposition, l.lotStatus, l.hold === null])).toEqual([
      [lot(3), 'release', 'released', true],
      [lot(4), 'rework', 'on-hold', false],
      [lot(5), 'downgrade', 'released', true],
      [lot(6), 'scrap', 'rejected', true],
    ]);
    expect(v.lots[2].downgradeProduct).toEqual({ id: other.productId, code: other.productCode, name: expect.any(String) });
    const audit = await db.execute<{ entity: string; n: number }>(sql`
      select entity, count(*)::int as n from audit_events where action = 'disposition' and after ->> 'ncrId' = ${String(id)} group by entity order by entity`);
    expect(audit.rows).toEqual([
      { entity: 'lot', n: 4 },
      { entity: 'ncr', n: 4 },
    ]);
    const released = await db.execute<{ release_reason: string }>(sql`select release_reason from lot_holds h join lots l on l.id = h.lot_id where l.lot_number = ${lot(6)} and h.ncr_id = ${id}`);
    expect(released.rows[0].release_reason).toContain('Strength far below specification');
    // A decision stands; an unknown lot is named.
    expect((await patch(id, { dispositions: [{ lotNumber: lot(3), disposition: 'scrap', note: 'Changed my mind' }] })).status).toBe(409);
    const unknown = await patch(id, { dispositions: [{ lotNumber: lot(9), disposition: 'scrap', note: 'Not on this NCR' }] });
    expect(unknown.status).toBe(404);
    expect(unknown.body.error).toContain(lot(9));
  });
});

describe('actions', () => {
  it('flags overdue actions by the plant’s day, lists due ones for the overview, and lets the owner record evidence only', async () => {
    const { body } = await raise({});
    const id = body.id as number;
    const late = (await addAction(id, { description: 'Check the sand moisture meter', dueDate: plantDayFromToday(-1) })).body.actions[0];
    await addAction(id, { kind: 'preventive', description: 'Add a levelling check to the shift start', dueDate: plantDayFromToday(2) });
    await addAction(id, { description: 'Train the new shift on the flow test', dueDate: plantDayFromToday(5), ownerId: ids.manager });
    const v = await get(id);
    expect(v.actions.map((a) => [a.description, a.overdue])).toEqual([
      ['Check the sand moisture meter', true],
      ['Add a levelling check to the shift start', false],
      ['Train the new shift on the flow test', false],
    ]);
    expect(v).toMatchObject({ openActions: 3, overdueActions: 1 });

    const due = (await request(app).get('/api/v1/ncrs/overdue-actions').set(await as('auditor'))).body as NcrActionDue[];
    expect(due.filter((d) => d.ncrId === id).map((d) => d.action.description)).toEqual(['Check the sand moisture meter', 'Add a levelling check to the shift start']);
    const overdueList = (await request(app).get(`/api/v1/ncrs?overdue=true&q=${encodeURIComponent(v.number)}`).set(await as('auditor'))).body as NcrList;
    expect(overdueList.items.map((i) => i.id)).toEqual([id]);

    const path = `/api/v1/ncrs/${id}/actions/${late.id}`;
    expect((await request(app).patch(path).set(await as('technician')).send({ dueDate: plantDayFromToday(9) })).status).toBe(403);
    expect((await request(app).patch(path).set(await as('technician')).send({ doneDate: plantDayFromToday(1) })).status).toBe(400);
    const done = await request(app).patch(path).set(await as('technician')).send({ doneDate: plantDayFromToday(0), evidence: 'Meter replaced, certificate attached' });
    expect(done.status).toBe(200);
    expect(done.body.actions.find((a: { id: number }) => a.id === late.id)).toMatchObject({ doneDate: plantDayFromToday(0), evidence: 'Meter replaced, certificate attached', overdue: false });
    const managersAction = v.actions[2].id;
    expect((await request(app).patch(`/api/v1/ncrs/${id}/actions/${managersAction}`).set(await as('technician')).send({ evidence: 'Not mine' })).status).toBe(403);
    expect((await request(app).patch(`/api/v1/ncrs/${id}/actions/2000000000`).set(await as('quality_manager')).send({ evidence: 'None' })).status).toBe(404);
    // People read the action by what it is and the day in the demo plant's format (dd/MM/yyyy), not by id and ISO.
    const doneDescription = done.body.actions.find((a: { id: number }) => a.id === late.id).description as string;
    const [y, m, d] = plantDayFromToday(0).split('-');
    expect(done.body.history.map((h: { summary: string }) => h.summary).at(-1)).toBe(`Action “${doneDescription}” done on ${d}/${m}/${y}.`);
  });

  it('lists with filters, bounded by limit, with the total and the count of each state', async () => {
    const a = await raise({ title: 'Listed NCR alpha for the filter', severity: 'critical', lots: [{ lotNumber: lot(7) }] });
    await raise({ title: 'Listed NCR beta for the filter', severity: 'critical', lots: [{ lotNumber: lot(7) }] });
    const h = await as('auditor');
    const byLot = (await request(app).get(`/api/v1/ncrs?q=${encodeURIComponent(lot(7))}&limit=1`).set(h)).body as NcrList;
    expect(byLot.items).toHaveLength(1);
    expect(byLot.total).toBe(2);
    expect(byLot.counts).toEqual({ open: 2 });
    expect(byLot.items[0].lotNumbers).toEqual([lot(7)]);
    const critical = (await request(app).get(`/api/v1/ncrs?severity=critical&status=open&productId=${t.productId}`).set(h)).body as NcrList;
    expect(critical.items.map((i) => i.id)).toContain(a.body.id);
    expect(critical.items.every((i) => i.severity === 'critical' && i.status === 'open')).toBe(true);
    expect((await request(app).get('/api/v1/ncrs?limit=501').set(h)).status).toBe(400);
  });
});

describe('attachments', () => {
  // PNG signature (ISO/IEC 15948 §5.2) followed by an IHDR chunk's length and type.
  const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52, 1, 2, 3, 4]);
  let id: number;
  beforeAll(async () => {
    id = (await raise({})).body.id;
  });
  const attach = async (bytes: Buffer, name: string, role: Role = 'technician') => request(app).post(`/api/v1/ncrs/${id}/attachments`).set(await as(role)).attach('file', bytes, name);

  it('keeps a photo a technician attaches, under a plain name, and hands it back as a download with its SHA-256', async () => {
    const res = await request(app).post(`/api/v1/ncrs/${id}/attachments`).set(await as('technician')).field('note', 'Photo of the specimen').attach('file', png, '../../etc/passwd.png');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const att = (res.body as NcrView).attachments.at(-1)!;
    // SHA-256 by Node's crypto (OpenSSL, FIPS 180-4) as the reference.
    const sha = createHash('sha256').update(png).digest('hex');
    expect(att).toMatchObject({ fileName: 'passwd.png', contentType: 'image/png', sizeBytes: png.length, sha256: sha, note: 'Photo of the specimen', url: `/api/v1/ncrs/${id}/attachments/${att.id}` });
    const down = await request(app).get(att.url).set(await as('auditor')).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(down.status).toBe(200);
    expect(Buffer.compare(down.body as Buffer, png)).toBe(0);
    expect(createHash('sha256').update(down.body as Buffer).digest('hex')).toBe(sha);
    expect(down.headers['x-content-sha256']).toBe(sha);
    // RFC 3230 instance digest with the sha-256 token of RFC 5843: base64 of the digest bytes.
    expect(down.headers['digest']).toBe(`sha-256=${createHash('sha256').update(png).digest('base64')}`);
    expect(down.headers['content-disposition']).toMatch(/^attachment; filename="?passwd\.png"?$/);
    expect(down.headers['x-content-type-options']).toBe('nosniff');
    expect(down.headers['content-type']).toBe('image/png');
    expect((await get(id)).history.at(-1)).toMatchObject({ action: 'attach file', summary: 'File attached: passwd.png.' });
  });

  // Control characters cannot travel in a multipart header (busboy refuses them: 400); sanitiseFileName's own test covers them.
  it('keeps letters of any script in a name', async () => {
    const res = await attach(Buffer.from('Prüfung;Wert\n1;2\n'), 'Prüfbericht Ø-Mörtel.csv');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const att = (res.body as NcrView).attachments.at(-1)!;
    expect(att).toMatchObject({ fileName: 'Prüfbericht Ø-Mörtel.csv', contentType: 'text/csv' });
    const down = await request(app).get(att.url).set(await as('auditor'));
    // RFC 6266 / RFC 8187: the UTF-8 name in filename*.
    expect(down.headers['content-disposition']).toContain(`filename*=UTF-8''${encodeURIComponent('Prüfbericht Ø-Mörtel.csv').replace(/'/g, '%27')}`);
  });

  it('refuses programs, scripts and markup by their bytes, whatever the name, with 415', async () => {
    const cases: [string, Buffer, string][] = [
      // "MZ" opens a Windows PE file (Microsoft PE/COFF specification, MS-DOS stub).
      ['report.pdf', Buffer.concat([Buffer.from('MZ'), Buffer.from([0x90, 0, 3, 0, 0, 0, 4, 0])]), 'a Windows program'],
      // 0x7F "ELF" (System V ABI, e_ident).
      ['photo.png', Buffer.from([0x7f, 0x45, 0x4c, 0x46, 2, 1, 1, 0]), 'a Linux program'],
      ['results.csv', Buffer.from('#!/bin/sh\nrm -rf /\n'), 'a script'],
      ['notes.txt', Buffer.from('<!DOCTYPE html><html><script>alert(1)</script></html>'), 'HTML, SVG or XML markup'],
      ['chart.png', Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"><script>alert(1)</script></svg>'), 'HTML, SVG or XML markup'],
      ['data.csv', Buffer.from('\ufeff<?xml version="1.0"?><a/>'), 'HTML, SVG or XML markup'],
    ];
    for (const [name, bytes, what] of cases) {
      const res = await attach(bytes, name);
      expect(res.status, name).toBe(415);
      expect(res.body.error).toBe(`${name} is ${what}, whatever its name says; attach photos (PNG, JPEG), PDFs or text and CSV files only`);
    }
    const zip = await attach(Buffer.from([0x50, 0x4b, 0x03, 0x04, 0, 0, 0, 0]), 'archive.pdf');
    expect(zip.status).toBe(415);
    expect((await get(id)).attachments.map((a) => a.fileName)).not.toContain('report.pdf');
  });

  it('answers 413 with a plain message for a file above 10 MB, and 400 for too many or no files', async () => {
    const big = await attach(Buffer.alloc(10 * 1024 * 1024 + 1, 0x41), 'big.txt');
    expect(big.status).toBe(413);
    expect(big.body.error).toBe('A file is larger than 10 MB; attach a smaller photo or split the file');
    let req = request(app).post(`/api/v1/ncrs/${id}/attachments`).set(await as('technician'));
    for (let i = 0; i < 6; i++) req = req.attach('file', png, `p${i}.png`);
    const many = await req;
    expect(many.status).toBe(400);
    expect(many.body.error).toBe('Attach at most 5 files at a time, in the form field "file"');
    const none = await request(app).post(`/api/v1/ncrs/${id}/attachments`).set(await as('technician')).field('note', 'nothing');
    expect(none.status).toBe(400);
    expect((await request(app).get(`/api/v1/ncrs/${id}/attachments/2000000000`).set(await as('auditor'))).status).toBe(404);
  });
});

describe('e-mail', () => {
  type Mail = { kind: string; user_id: number; subject: string; text_body: string; html_body: string };
  const mailsOf = async (ncrId: number) =>
    (await db.execute<Mail>(sql`select kind, user_id, subject, text_body, html_body from mail_outbox where (refs ->> 'ncrId')::int = ${ncrId} order by id`)).rows;

  it('queues a plain message to the assignee and the product’s immediate subscribers when raised, assigned, closed and reopened', async () => {
    await db.execute(sql`insert into alarm_subscriptions (user_id, product_id, immediate, digest) values (${ids.auditor}, ${t.productId}, true, false) on conflict do nothing`);
    const res = await raise({ lots: [{ lotNumber: lot(10) }], assigneeId: ids.technician });
    const v = res.body as NcrView;
    let mails = await mailsOf(v.id);
    const raised = mails.filter((m) => m.subject.startsWith('Prismline NCR raised'));
    expect(raised.map((m) => m.user_id)).toEqual(expect.arrayContaining([ids.technician, ids.auditor]));
    const m = raised[0];
    expect(m.kind).toBe('ncr');
    expect(m.subject).toBe(`Prismline NCR raised: ${v.number} — ${baseNcr.title} (${t.productCode})`);
    for (const fact of [v.number, baseNcr.title, t.productCode, lot(10), `${PUBLIC_URL}/ncrs/${v.id}`, 'was raised by']) expect(m.text_body).toContain(fact);
    expect(m.html_body).toContain(`href="${PUBLIC_URL}/ncrs/${v.id}"`);

    await patch(v.id, { assigneeId: ids.manager });
    mails = await mailsOf(v.id);
    expect(mails.filter((x) => x.subject.startsWith('Prismline NCR assigned')).map((x) => x.user_id)).toEqual(expect.arrayContaining([ids.manager, ids.auditor]));

    // Close, then reopen with its reason.
    const ready = await readyToClose(10);
    await patch(ready, { assigneeId: ids.technician });
    await step(ready, 'closed');
    await step(ready, 'open', 'Flow low again on lot eleven');
    const occasions = (await mailsOf(ready)).filter((x) => x.user_id === ids.technician).map((x) => x.subject.split(':')[0]);
    expect(occasions).toEqual(['Prismline NCR assigned', 'Prismline NCR closed', 'Prismline NCR reopened']);
    const reopened = (await mailsOf(ready)).find((x) => x.user_id === ids.technician && x.subject.startsWith('Prismline NCR reopened'))!;
    expect(reopened.text_body).toContain('Reason: Flow low again on lot eleven');
  });
});
