// The daily NCR action reminders and the morning digest's NCR section against the test database. The
// NCR and its actions are made through the API on an invented test product and removed afterwards.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import { createApp } from '@api/app';
import { createDatabase } from '@api/db/client';
import { queueDigests } from '@api/mail/notify';
import { databaseUrl, demoEmail, demoTokens, TEST_JWT_SECRET } from '@tests/support/api';
import { createTestCharacteristic, removeTestCharacteristics, testDay, testPair, userIdByEmail, type TestCharacteristic } from '@tests/support/plant';
import type { NcrView } from '@shared/schemas/ncrs';
import type { Role } from '@shared/schemas/roles';
import { plantDay } from '@shared/time';
import { queueNcrReminders } from './ncr-reminders';

const PUBLIC_URL = 'http://prismline.test';
const db = createDatabase(databaseUrl(), 4);
const app = createApp({ db, config: { jwtSecret: TEST_JWT_SECRET, loginAttemptsPer15Min: 50 }, serveWeb: false, publicUrl: PUBLIC_URL });
const tokenFor = demoTokens(app);
const as = async (role: Role) => ({ authorization: `Bearer ${await tokenFor(role)}` });

let t: TestCharacteristic;
let plant: { id: number; time_zone: string };
let ncr: NcrView;
const people = { technician: 0, manager: 0, auditor: 0 };
const DAY_MS = 24 * 3600 * 1000;

/** A plant calendar day `n` days from today at the plant. */
const dayFromToday = (n: number) => {
  const d = new Date(`${plantDay(new Date(), plant.time_zone)}T12:00:00Z`);
  d.setUTCDate(d.getUTCDate() + n);
  return d.toISOString().slice(0, 10);
};

beforeAll(async () => {
  t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
  await t.addLot('R1', testDay(1), testPair(1));
  plant = (await db.execute<{ id: number; time_zone: string }>(sql`select id, time_zone from plants order by id limit 1`)).rows[0];
  people.technician = await userIdByEmail(db, demoEmail.technician);
  people.manager = await userIdByEmail(db, demoEmail.quality_manager);
  people.auditor = await userIdByEmail(db, demoEmail.auditor);
  const h = await as('quality_manager');
  const raised = await request(app)
    .post('/api/v1/ncrs')
    .set(h)
    .send({ title: 'Reminder test NCR on flow', description: 'Flow below the limit on the reminder test lot.', severity: 'minor', lots: [{ lotNumber: t.lotNumber('R1') }], assigneeId: people.manager });
  expect(raised.status).toBe(201);
  const id = raised.body.id as number;
  const add = (description: string, dueDate: string) => request(app).post(`/api/v1/ncrs/${id}/actions`).set(h).send({ kind: 'corrective', description, ownerId: people.technician, dueDate });
  await add('Overdue: recalibrate the flow table', dayFromToday(-1));
  await add('Due soon: level the flow table', dayFromToday(2));
  await add('Later: retrain the shift on the flow test', dayFromToday(6));
  const done = await add('Done already: replace the cone', dayFromToday(-3));
  const doneId = (done.body as NcrView).actions.find((a) => a.description.startsWith('Done already'))!.id;
  await request(app).patch(`/api/v1/ncrs/${id}/actions/${doneId}`).set(h).send({ doneDate: dayFromToday(0) });
  ncr = (await request(app).get(`/api/v1/ncrs/${id}`).set(h)).body;
});

afterAll(async () => {
  if (ncr) {
    await db.execute(sql`delete from lot_holds where ncr_id = ${ncr.id}`);
    for (const table of ['ncr_attachments', 'ncr_actions', 'ncr_alarms', 'ncr_lots']) await db.execute(sql`delete from ${sql.identifier(table)} where ncr_id = ${ncr.id}`);
    await db.execute(sql`delete from ncrs where id = ${ncr.id}`);
  }
  await removeTestCharacteristics(db);
  await db.$client.end();
});

type Mail = { user_id: number; subject: string; text_body: string; action_id: number };
const remindersOf = async () =>
  (
    await db.execute<Mail>(sql`
      select user_id, subject, text_body, (refs ->> 'ncrActionId')::int as action_id from mail_outbox
      where kind = 'ncr-action' and (refs ->> 'ncrId')::int = ${ncr.id} order by id`)
  ).rows;
const actionId = (prefix: string) => ncr.actions.find((a) => a.description.startsWith(prefix))!.id;

describe('NCR action reminders', () => {
  it('reminds the owner and the assignee of an action due within two days and of an overdue one, once each', async () => {
    const now = new Date();
    const queued = await queueNcrReminders(db, { plantId: plant.id, timeZone: plant.time_zone, now, publicUrl: PUBLIC_URL });
    // At least this NCR's four; the demo history's open NCR, in the same database, may add its own.
    expect(queued).toBeGreaterThanOrEqual(4);
    const mails = await remindersOf();
    expect(mails.map((m) => [m.action_id, m.user_id]).sort()).toEqual(
      [
        [actionId('Overdue'), people.technician],
        [actionId('Overdue'), people.manager],
        [actionId('Due soon'), people.technician],
        [actionId('Due soon'), people.manager],
      ].sort(),
    );
    const overdue = mails.find((m) => m.action_id === actionId('Overdue'))!;
    expect(overdue.subject).toMatch(new RegExp(`^Prismline NCR action overdue: ${ncr.number} — action #${actionId('Overdue')} due `));
    for (const fact of ['Overdue: recalibrate the flow table', ncr.number, t.productCode, t.lotNumber('R1'), `${PUBLIC_URL}/ncrs/${ncr.id}`]) expect(overdue.text_body).toContain(fact);
    expect(mails.find((m) => m.action_id === actionId('Due soon'))!.subject).toContain('due soon');
    // The same day again, or a second scheduler: nothing new.
    expect(await queueNcrReminders(db, { plantId: plant.id, timeZone: plant.time_zone, now, publicUrl: PUBLIC_URL })).toBe(0);
  });

  it('reminds again once the due-soon action becomes overdue, and for a new due date', async () => {
    const later = new Date(Date.now() + 4 * DAY_MS);
    const before = (await remindersOf()).length;
    // Four days on, "Due soon" is overdue and "Later" falls due within two days.
    await queueNcrReminders(db, { plantId: plant.id, timeZone: plant.time_zone, now: later, publicUrl: PUBLIC_URL });
    const after = await remindersOf();
    const fresh = after.slice(before).filter((m) => m.user_id === people.technician);
    expect(fresh.map((m) => [m.action_id, m.subject.includes('overdue')]).sort()).toEqual(
      [
        [actionId('Due soon'), true],
        [actionId('Later'), false],
      ].sort(),
    );
    expect(await queueNcrReminders(db, { plantId: plant.id, timeZone: plant.time_zone, now: later, publicUrl: PUBLIC_URL })).toBe(0);
    const moved = await request(app).patch(`/api/v1/ncrs/${ncr.id}/actions/${actionId('Overdue')}`).set(await as('quality_manager')).send({ dueDate: dayFromToday(1) });
    expect(moved.status).toBe(200);
    expect(await queueNcrReminders(db, { plantId: plant.id, timeZone: plant.time_zone, now: new Date(), publicUrl: PUBLIC_URL })).toBe(2);
  });
});

describe('morning digest', () => {
  it('gains a section with the NCRs raised in the period, those open and the overdue actions, also for a subscriber without new signals', async () => {
    // A day of its own, so no digest of another test has taken this subscriber's key.
    const now = new Date(Date.now() + 20 * DAY_MS);
    await db.execute(sql`update ncrs set created_at = ${new Date(now.getTime() - 3600_000).toISOString()}::timestamptz where id = ${ncr.id}`);
    await db.execute(sql`insert into alarm_subscriptions (user_id, product_id, immediate, digest) values (${people.auditor}, ${t.productId}, false, true) on conflict do nothing`);
    expect(await queueDigests(db, { plantId: plant.id, timeZone: plant.time_zone, now, publicUrl: PUBLIC_URL })).toBeGreaterThanOrEqual(1);
    const digest = (
      await db.execute<{ subject: string; text_body: string; html_body: string }>(sql`
        select subject, text_body, html_body from mail_outbox where kind = 'digest' and user_id = ${people.auditor} and dedupe_key = ${`digest:${plant.id}:${plantDay(now, plant.time_zone)}:user:${people.auditor}`}`)
    ).rows[0];
    expect(digest.subject).toMatch(/: no new signals; \d+ NCRs? raised; \d+ NCR actions? overdue$/);
    const section = digest.text_body.slice(digest.text_body.indexOf('Nonconformance reports'));
    expect(section).toMatch(/Raised in the period: \d+/);
    expect(section).toContain(`${ncr.number} (minor, open, ${t.productCode}): Reminder test NCR on flow ${PUBLIC_URL}/ncrs/${ncr.id}`);
    expect(section).toMatch(/Overdue actions: \d+/);
    expect(section).toContain(`Action #${actionId('Later')} of ${ncr.number}`);
    expect(digest.html_body).toContain('<h3 style="font-size:15px">Nonconformance reports</h3>');
    expect(await queueDigests(db, { plantId: plant.id, timeZone: plant.time_zone, now, publicUrl: PUBLIC_URL })).toBe(0);
  });
});
