import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { alarms, alarmSubscriptions, auditEvents, capabilityWatch, characteristics, mailOutbox } from '@api/db/schema';
import { refersTo } from '@api/mail/outbox';
import { createSpcTestApi } from '@tests/support/spc-api';
import { createRunRow, createTestCharacteristic, removeTestCharacteristics, userIdByEmail } from '@tests/support/plant';
import { runCharacteristic } from './run';

const api = createSpcTestApi();
afterAll(async () => {
  await removeTestCharacteristics(api.db);
  await api.close();
});

const publicUrl = 'http://prismline.test';
/** Four replicates around 145 mm, spread ±3: far inside a 130–160 mm specification. */
const good = (i: number) => [145 + ((i * 7) % 5) - 2, 145 + ((i * 3) % 7) - 3, 145 + ((i * 5) % 3) - 1, 145 + ((i * 11) % 5) - 2];
/** A lot near the upper specification limit. */
const high = [157, 158, 159, 158];

async function run(characteristicId: number) {
  const runId = await createRunRow(api.db, [characteristicId]);
  await runCharacteristic(api.db, { runId, characteristicId, worker: 'test', publicUrl });
  return runId;
}
const capabilityAlarms = (characteristicId: number) =>
  api.db.select().from(alarms).where(and(eq(alarms.characteristicId, characteristicId), eq(alarms.rule, 'capability'))).orderBy(alarms.id);
const watchOf = async (characteristicId: number) => (await api.db.select().from(capabilityWatch).where(eq(capabilityWatch.characteristicId, characteristicId)))[0];

describe('the falling-capability alarm', () => {
  it('is raised once per crossing below the threshold, with the chart’s own index, and left for the digest', async () => {
    const t = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 4, specs: [{ lsl: 130, usl: 160, effectiveFrom: '2020-01-01T00:00:00Z' }] });
    await api.db.insert(alarmSubscriptions).values({ userId: await userIdByEmail(api.db, 'manager@harrowvale.example'), productId: t.productId, immediate: true, digest: false });
    // Produced hour by hour up to now, so the newest lot is recent enough for an immediate e-mail.
    let hour = 0;
    const at = () => new Date(Date.now() - (60 - hour++) * 3_600_000).toISOString();
    for (let i = 0; i < 25; i++) await t.addLot(`C${i}`, at(), good(i));

    // 25 subgroups of 4 = 100 values: no longer preliminary; Cpk far above 1.33.
    await run(t.characteristicId);
    expect(await capabilityAlarms(t.characteristicId)).toEqual([]);
    const above = await watchOf(t.characteristicId);
    expect(above).toMatchObject({ below: false, indexName: 'Cpk', threshold: 1.33 });
    expect(above.indexValue!).toBeGreaterThan(1.33);

    // Three lots near the upper limit: the chart leaves control (Ppk stands in) and the index falls below 1.33.
    for (let i = 0; i < 3; i++) await t.addLot(`H${i}`, at(), high);
    const runId = await run(t.characteristicId);
    const [first] = await capabilityAlarms(t.characteristicId);
    expect(first).toMatchObject({ chart: 'location', status: 'open', source: 'run', runId, limitName: 'Ppk', limitValue: 1.33, pointIndex: 27 });
    const fell = await watchOf(t.characteristicId);
    expect(fell).toMatchObject({ below: true, indexName: 'Ppk', alarmId: first.id });
    // The figure is the chart API's for the same characteristic (its window: all 28 lots, fewer than the rolling 100).
    const chart = await request(api.app).get(`/api/v1/characteristics/${t.characteristicId}/chart`).set(await api.as('auditor'));
    expect(chart.body.capability.ppk).toBeCloseTo(fell.indexValue!, 12);
    expect(first.statistic).toBeCloseTo(chart.body.capability.ppk, 12);
    // Ppk = (USL − mean)/(3 s) with the overall sample standard deviation (ISO 22514-2), recomputed here from the values.
    const values = [...Array.from({ length: 25 }, (_, i) => good(i)).flat(), ...high, ...high, ...high];
    const mean = values.reduce((s, v) => s + v, 0) / values.length;
    const s = Math.sqrt(values.reduce((acc, v) => acc + (v - mean) ** 2, 0) / (values.length - 1));
    expect(fell.indexValue!).toBeCloseTo(Math.min(160 - mean, mean - 130) / (3 * s), 10);
    expect(first.description).toMatch(/^Ppk \d\.\d\d over the newest 28 lots \(.+-C0 to .+-H2, 112 results\) fell below the threshold 1\.33\./);
    const [audit] = await api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'alarm'), eq(auditEvents.entityId, String(first.id))));
    expect(audit).toMatchObject({ action: 'raise falling capability', actorId: null });
    const mail = await api.db.select().from(mailOutbox).where(refersTo('alarmIds', [first.id]));
    // A trend over many lots, not one lot to stop: it waits for the morning digest, so a first run over a
    // plant's history sends no immediate message per characteristic.
    expect(mail.map((m) => m.kind)).toEqual([]);

    // Still below at the next run: no second alarm.
    await t.addLot('C25', at(), good(25));
    await run(t.characteristicId);
    expect(await capabilityAlarms(t.characteristicId)).toHaveLength(1);
    expect((await watchOf(t.characteristicId)).below).toBe(true);

    // Back above (the three lots' assignable cause found, their points excluded), then below again: a second alarm.
    await api.db.execute(sql`insert into point_exclusions (characteristic_id, lot_id, reason) select ${t.characteristicId}, id, 'Wrong water dose' from lots where lot_number like ${t.lotNumber('H%')}`);
    await run(t.characteristicId);
    expect((await watchOf(t.characteristicId)).below).toBe(false);
    expect(await capabilityAlarms(t.characteristicId)).toHaveLength(1);
    for (let i = 3; i < 6; i++) await t.addLot(`H${i}`, at(), high);
    await run(t.characteristicId);
    const both = await capabilityAlarms(t.characteristicId);
    expect(both).toHaveLength(2);
    expect(both[1].lotId).not.toBe(first.lotId);
    expect((await watchOf(t.characteristicId)).alarmId).toBe(both[1].id);
  });

  it('takes the characteristic’s own threshold before the plant’s, and raises nothing on a preliminary estimate', async () => {
    const t = await createTestCharacteristic(api.db, { chartType: 'xbar-r', subgroupSize: 4, specs: [{ lsl: 130, usl: 160, effectiveFrom: '2020-01-01T00:00:00Z' }] });
    let hour = 0;
    const at = () => new Date(Date.now() - (60 - hour++) * 3_600_000).toISOString();
    // A threshold no real process reaches: only the sample size keeps the alarm back.
    await api.db.update(characteristics).set({ capabilityThreshold: 50 }).where(eq(characteristics.id, t.characteristicId));
    for (let i = 0; i < 24; i++) await t.addLot(`P${i}`, at(), good(i));
    // 24 subgroups, 96 values: preliminary (fewer than 25 subgroups and 100 values), so no judgement.
    await run(t.characteristicId);
    expect(await capabilityAlarms(t.characteristicId)).toEqual([]);
    expect(await watchOf(t.characteristicId)).toBeUndefined();
    await t.addLot('P24', at(), good(24));
    await run(t.characteristicId);
    const [raised] = await capabilityAlarms(t.characteristicId);
    expect(raised).toMatchObject({ limitName: 'Cpk', limitValue: 50 });
  });
});
