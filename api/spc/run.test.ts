import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, inArray, sql } from 'drizzle-orm';
import { createDatabase } from '../db/client';
import { alarmSubscriptions, alarms, auditEvents, lots, mailOutbox, measurements, spcRunItems, spcRuns, spcSnapshots } from '../db/schema';
import { databaseUrl } from '@tests/support/api';
import { computeCharacteristicChart } from './chart-load';
import { runCharacteristic } from './run';
import { createRunRow, createTestCharacteristic, removeTestCharacteristics, userIdByEmail } from '@tests/support/plant';
import { raiseOutOfSpecAlarms } from './results-changed';
import { DATA_CHANGED_NOTE } from './alarms';
import { queueDigests, queueRunMail } from '../mail/notify';
import { refersTo } from '../mail/outbox';

const db = createDatabase(databaseUrl(), 4);
afterAll(async () => {
  await removeTestCharacteristics(db);
  await db.$client.end();
});

const publicUrl = 'http://prismline.test';
const day = (d: number, hour = 6) => new Date(Date.UTC(2025, 2, 1 + d, hour)).toISOString();
const pair = (i: number): number[] => [145 + ((i * 7) % 5) - 2, 145 + ((i * 3) % 7) - 3];
/** An hour ago: a lot this recent is e-mailed at once; the 2025 history of these tests goes to the digest only. */
const recent = () => new Date(Date.now() - 3_600_000).toISOString();
/** The lot's results were tested just now (a late 28-day result of an old lot). */
const testedNow = (added: { measurementIds: number[] }) => db.update(measurements).set({ testedAt: new Date() }).where(inArray(measurements.id, added.measurementIds));

async function run(characteristicId: number) {
  const runId = await createRunRow(db, [characteristicId]);
  const outcome = await runCharacteristic(db, { runId, characteristicId, worker: 'test', publicUrl });
  return { runId, outcome };
}

const alarmsOf = (characteristicId: number) => db.select().from(alarms).where(eq(alarms.characteristicId, characteristicId)).orderBy(alarms.id);
const outboxFor = (alarmIds: number[]) =>
  db.select().from(mailOutbox).where(refersTo('alarmIds', alarmIds)).orderBy(mailOutbox.id);

async function subscribeManager(productId: number, kinds: { immediate: boolean; digest: boolean }, email = 'manager@harrowvale.example') {
  const userId = await userIdByEmail(db, email);
  await db.insert(alarmSubscriptions).values({ userId, productId, ...kinds });
  return userId;
}

describe('one characteristic of a run', () => {
  it('stores the chart, its limits, violations and capability in one snapshot and marks the item done', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2, specs: [{ lsl: 130, usl: 160, effectiveFrom: day(-30) }] });
    for (let i = 0; i < 25; i++) await t.addLot(`S${i}`, day(i), i === 20 ? [171, 172] : pair(i));
    const { runId, outcome } = await run(t.characteristicId);
    expect(outcome).toMatchObject({ skipped: false, changed: true });

    const chart = await computeCharacteristicChart(db, t.characteristicId);
    const [snap] = await db.select().from(spcSnapshots).where(eq(spcSnapshots.characteristicId, t.characteristicId));
    expect(snap.runId).toBe(runId);
    expect(snap.pointCount).toBe(25);
    expect(snap.lotIds).toEqual(chart.points.map((p) => p.lotId));
    expect(snap.location).toEqual(chart.points.map((p) => p.location));
    expect(snap.violations).toEqual(chart.violations);
    expect((snap.capability as { cpk: number }).cpk).toBeCloseTo(chart.capability!.cpk!, 12);

    const raised = await alarmsOf(t.characteristicId);
    // Point 20 (mean 171.5) lies far beyond the trial UCL and above the USL of 160.
    expect(raised.map((a) => [a.rule, a.pointIndex, a.status])).toEqual(
      expect.arrayContaining([
        ['we1', 20, 'open'],
        ['out-of-spec', 20, 'open'],
      ]),
    );
    expect(raised.find((a) => a.rule === 'we1')!.description).toMatch(/above the upper control limit/);
    const [item] = await db.select().from(spcRunItems).where(eq(spcRunItems.runId, runId));
    expect(item).toMatchObject({ status: 'succeeded', attempts: 1, changed: true, alarmsRaised: raised.length });
    const [r] = await db.select().from(spcRuns).where(eq(spcRuns.id, runId));
    expect(r.status).toBe('succeeded');
    expect(r.finishedAt).not.toBeNull();
  });

  it('changes nothing on a re-run with the same inputs: no new alarm, no new e-mail, the snapshot untouched', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
    for (let i = 0; i < 22; i++) await t.addLot(`R${i}`, day(i), pair(i));
    await subscribeManager(t.productId, { immediate: true, digest: false });
    await run(t.characteristicId);
    await t.addLot('R22', recent(), [170, 171]);
    await run(t.characteristicId);
    const before = await alarmsOf(t.characteristicId);
    const mails = await outboxFor(before.map((a) => a.id));
    expect(before.some((a) => a.rule === 'we1' && a.pointIndex === 22)).toBe(true);
    expect(mails.length).toBeGreaterThan(0);
    const [snapBefore] = await db.select().from(spcSnapshots).where(eq(spcSnapshots.characteristicId, t.characteristicId));

    const again = await run(t.characteristicId);
    expect(again.outcome).toMatchObject({ changed: false, raised: 0, resolved: 0 });
    expect(await alarmsOf(t.characteristicId)).toEqual(before);
    // The same messages, none added: the test server's mail sender may be delivering them meanwhile,
    // so their delivery state (attempts, lock, sent time) is not compared.
    const message = (m: (typeof mails)[number]) => ({ id: m.id, kind: m.kind, dedupeKey: m.dedupeKey, userId: m.userId, refs: m.refs, subject: m.subject });
    expect((await outboxFor(before.map((a) => a.id))).map(message)).toEqual(mails.map(message));
    const [snapAfter] = await db.select().from(spcSnapshots).where(eq(spcSnapshots.characteristicId, t.characteristicId));
    expect(snapAfter).toEqual(snapBefore);
  });

  it('raises an alarm that says so when a late result creates a violation at an earlier position, and e-mails it with a chart link', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
    for (let i = 0; i < 30; i += 1) if (i !== 10) await t.addLot(`D${i}`, day(i), pair(i));
    // The auditor: the demo seed already queued today's digest of the manager, and a digest goes once a day.
    const userId = await subscribeManager(t.productId, { immediate: true, digest: true }, 'auditor@harrowvale.example');
    await run(t.characteristicId);
    const quiet = await alarmsOf(t.characteristicId);

    // The 28-day strength of lot D10 arrives weeks after its production; its lot sits at position 10.
    await testedNow(await t.addLot('D10', day(10), [176, 177]));
    const { outcome } = await run(t.characteristicId);
    expect(outcome.raised).toBeGreaterThan(0);
    const late = (await alarmsOf(t.characteristicId)).filter((a) => !quiet.some((q) => q.id === a.id));
    const we1 = late.find((a) => a.rule === 'we1')!;
    expect(we1).toMatchObject({ pointIndex: 10, late: true, status: 'open', source: 'run' });
    expect(we1.lateReason).toMatch(/Late result: lot .*D10 was tested after later lots were charted/);
    const [lot] = await db.select({ id: lots.id }).from(lots).where(eq(lots.lotNumber, t.lotNumber('D10')));
    expect(we1.lotId).toBe(lot.id);

    // The demo's manager follows line L1 too: find the auditor's message.
    const mail = (await outboxFor([we1.id])).find((m) => m.userId === userId)!;
    expect(mail).toMatchObject({ kind: 'alarm', userId, toAddress: 'auditor@harrowvale.example' });
    expect(mail.subject).toContain(t.lotNumber('D10'));
    expect(mail.textBody).toContain(`${publicUrl}/charts/${t.characteristicId}?lot=${t.lotNumber('D10')}`);
    expect(mail.textBody).toMatch(/Late result/);
    expect(mail.textBody).toMatch(/Subgroup mean 177 mm above the upper control limit \d+ mm\./);
    expect(mail.htmlBody).toContain(`href="${publicUrl}/charts/${t.characteristicId}?lot=${t.lotNumber('D10')}"`);

    // The digest of the day lists the same alarm once per subscriber, however often it is asked for.
    const plant = await db.execute<{ id: number; time_zone: string }>(sql`select pl.id, pl.time_zone from plants pl join products p on p.plant_id = pl.id where p.id = ${t.productId}`);
    const now = new Date();
    const queued = await queueDigests(db, { plantId: plant.rows[0].id, timeZone: plant.rows[0].time_zone, now, publicUrl });
    expect(queued).toBeGreaterThanOrEqual(1);
    expect(await queueDigests(db, { plantId: plant.rows[0].id, timeZone: plant.rows[0].time_zone, now, publicUrl })).toBe(0);
    const digests = await db.select().from(mailOutbox).where(and(eq(mailOutbox.kind, 'digest'), eq(mailOutbox.userId, userId), refersTo('alarmIds', [we1.id])));
    expect(digests).toHaveLength(1);
    expect(digests[0].textBody).toContain(t.code);
  });

  it('closes the alarms of voided data as resolved by a data change and keeps them', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2, specs: [{ lsl: 130, usl: 160, effectiveFrom: day(-30) }] });
    for (let i = 0; i < 24; i++) await t.addLot(`V${i}`, day(i), pair(i));
    await run(t.characteristicId);
    const wild = await t.addLot('V24', day(24), [175, 176]);
    await run(t.characteristicId);
    const open = (await alarmsOf(t.characteristicId)).filter((a) => a.pointIndex === 24);
    expect(open.map((a) => a.rule).sort()).toEqual(['out-of-spec', 'we1']);

    await db.update(measurements).set({ voidedAt: new Date() }).where(sql`${measurements.id} = any(${sql.param(wild.measurementIds)}::int[])`);
    const { outcome } = await run(t.characteristicId);
    expect(outcome.resolved).toBe(2);
    const after = await alarmsOf(t.characteristicId);
    for (const a of open) {
      expect(after.find((x) => x.id === a.id)).toMatchObject({ status: 'closed', resolution: 'data-changed', closeNote: expect.stringMatching(/no longer show/) });
    }
    // Each closing is in the audit trail, by no one, with the reason the alarm carries.
    const trail = await db
      .select({ entityId: auditEvents.entityId, actorId: auditEvents.actorId, before: auditEvents.before, after: auditEvents.after, reason: auditEvents.reason })
      .from(auditEvents)
      .where(and(eq(auditEvents.entity, 'alarm'), eq(auditEvents.action, 'close-automatically'), inArray(auditEvents.entityId, open.map((a) => String(a.id)))))
      .orderBy(auditEvents.entityId);
    expect(trail).toEqual(
      open
        .map((a) => ({ entityId: String(a.id), actorId: null, before: { status: 'open' }, after: { status: 'closed', resolution: 'data-changed' }, reason: DATA_CHANGED_NOTE }))
        .sort((x, y) => x.entityId.localeCompare(y.entityId)),
    );
  });
});

describe('the e-mails of a run', () => {
  it('tells the signals of one lot in one message per run, and history older than two days only in the digest', async () => {
    // Before: one lot beyond the specification, the control limit and the range limit made three
    // alarms and three e-mails with near-identical subjects.
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 3, specs: [{ lsl: 130, usl: 160, effectiveFrom: day(-30) }] });
    for (let i = 0; i < 24; i++) await t.addLot(`M${i}`, day(i), [...pair(i), 145]);
    await t.addLot('MOLD', day(24), [165, 170, 190]); // the same signals on a lot of the 2025 history
    await t.addLot('MNEW', recent(), [165, 170, 190]);
    await subscribeManager(t.productId, { immediate: true, digest: true });
    const { runId } = await run(t.characteristicId);
    const byLot = async (suffix: string) => {
      const [lot] = await db.select({ id: lots.id }).from(lots).where(eq(lots.lotNumber, t.lotNumber(suffix)));
      return (await alarmsOf(t.characteristicId)).filter((a) => a.lotId === lot.id);
    };
    // With MOLD just before it, MNEW also completes "two of three beyond 2 sigma": a pattern, for the digest.
    const all = await byLot('MNEW');
    expect(all.map((a) => `${a.rule}/${a.chart}`).sort()).toEqual(['out-of-spec/location', 'we1/dispersion', 'we1/location', 'we2/location']);
    const fresh = all.filter((a) => a.rule !== 'we2');
    const mails = await outboxFor(fresh.map((a) => a.id));
    expect(mails).toHaveLength(1);
    expect(mails[0].subject).toBe(`Prismline alarm: lot ${t.lotNumber('MNEW')} — Out of specification, Beyond a control limit (${t.code})`);
    expect(mails[0].textBody).toMatch(/^3 signals on lot /);
    expect(mails[0].textBody).toMatch(/Subgroup range 25 mm above the upper control limit/);
    expect(mails[0].textBody).toMatch(/Subgroup mean 175 mm above the upper control limit/);
    expect(mails[0].textBody).toMatch(/Lot result 175 mm \(mean of 3 results: 165, 170, 190\) above the upper specification limit 160 mm/);
    expect(mails[0].refs.alarmIds?.sort()).toEqual(fresh.map((a) => a.id).sort());
    expect(mails[0].dedupeKey).toMatch(new RegExp(`^lot:${fresh[0].lotId}:run:${runId}:user:`));
    // Queuing the run's mail again adds nothing: one message per lot and run.
    expect(await queueRunMail(db, runId, publicUrl)).toBe(0);
    // The old lot's signals wait for the digest.
    expect(await outboxFor((await byLot('MOLD')).map((a) => a.id))).toHaveLength(0);
  });
});

describe('out-of-specification results at import', () => {
  it('raise an alarm at once, judged on the lot mean against the revision in force at production, with e-mails, and the run adds no second one', async () => {
    const t = await createTestCharacteristic(db, {
      chartType: 'xbar-r',
      subgroupSize: 2,
      specs: [
        { lsl: 135, usl: 155, effectiveFrom: day(-30) },
        { lsl: 140, usl: 155, effectiveFrom: day(15) },
      ],
    });
    for (let i = 0; i < 21; i++) await t.addLot(`O${i}`, day(i), pair(i));
    await run(t.characteristicId);
    await subscribeManager(t.productId, { immediate: true, digest: false });

    const inOld = await t.addLot('OA', day(5, 9), [136, 137]); // inside revision 1 (135–155)
    const meanInside = await t.addLot('OB', day(6, 9), [133, 139]); // one value below 135, mean 136 inside: judged by the set's mean, as EN 196-1 reports strength (from memory)
    const outNew = await t.addLot('OC', day(20, 9), [138, 139]); // below revision 2's 140
    await testedNow(outNew);
    const ids = await raiseOutOfSpecAlarms(db, [...inOld.toJudge, ...meanInside.toJudge, ...outNew.toJudge], publicUrl);
    expect(ids).toHaveLength(1);
    const [alarm] = await db.select().from(alarms).where(eq(alarms.id, ids[0]));
    expect(alarm).toMatchObject({ rule: 'out-of-spec', source: 'ingest', limitName: 'LSL', limitValue: 140, statistic: 138.5, late: false });
    const chart = await computeCharacteristicChart(db, t.characteristicId);
    expect(chart.points[alarm.pointIndex].lotNumber).toBe(t.lotNumber('OC'));
    expect(alarm.description).toBe('Lot result 139 mm (mean of 2 results: 138, 139) below the lower specification limit 140 mm (specification revision 2).');
    expect(await outboxFor(ids)).toHaveLength(1);

    expect(await raiseOutOfSpecAlarms(db, outNew.toJudge, publicUrl)).toEqual([]);
    await run(t.characteristicId);
    const all = (await alarmsOf(t.characteristicId)).filter((a) => a.rule === 'out-of-spec');
    expect(all.map((a) => a.id)).toEqual(ids);
    expect(await outboxFor(ids)).toHaveLength(1);
  });
});
