import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { mean, sampleStandardDeviation } from 'simple-statistics';
import { createDatabase } from '../db/client';
import { auditEvents, lots, measurements, plants, processEvents, productionLines } from '../db/schema';
import { databaseUrl } from '@tests/support/api';
import { computeCharacteristicChart, excludePoint, freezeLimits, includePoint, limitRevisions } from './characteristic-chart';
import { createTestCharacteristic, removeTestCharacteristics, userIdByEmail } from '@tests/support/plant';

const db = createDatabase(databaseUrl(), 4);
afterAll(async () => {
  await removeTestCharacteristics(db);
  await db.$client.end();
});

const day = (d: number, hour = 6) => new Date(Date.UTC(2025, 0, 1 + d, hour)).toISOString();
/** Deterministic pairs around 145 mm with ranges that vary from lot to lot. */
const pair = (i: number): number[] => [145 + ((i * 7) % 5) - 2, 145 + ((i * 3) % 7) - 3];

async function lotIdOf(lotNumber: string) {
  const [row] = await db.select({ id: lots.id }).from(lots).where(eq(lots.lotNumber, lotNumber));
  return row.id;
}

describe('computeCharacteristicChart', () => {
  it('plots each lot at its production position, however late its result arrives, then by lot number', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
    await t.addLot('A', day(1), [145, 146]);
    await t.addLot('C', day(3), [144, 146]);
    await t.addLot('B', day(2), [147, 148]); // the late result (e.g. 28-day strength) of an earlier lot
    await t.addLot('D-2', day(4), [145, 145]);
    await t.addLot('D-10', day(4), [146, 144]);
    const chart = await computeCharacteristicChart(db, t.characteristicId);
    // Same production time: byte order of the lot number ("1" sorts before "2").
    expect(chart.points.map((p) => p.lotNumber)).toEqual(['A', 'B', 'C', 'D-10', 'D-2'].map(t.lotNumber));
    expect(chart.points.map((p) => p.index)).toEqual([0, 1, 2, 3, 4]);
    expect(chart.points[1]).toMatchObject({ n: 2, values: [147, 148], location: 147.5, dispersion: 1, producedAt: day(2) });
    expect(chart.limits.source).toBe('trial');
    expect(chart.reasons.join(' ')).toMatch(/preliminary/);
    expect(chart.spec).toBeNull();
    expect(chart.capability?.cp).toBeNull();
  });

  it('gives X̄–R trial limits that agree with the tabled A2, D3 and D4 for n = 2', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
    const groups = Array.from({ length: 25 }, (_, i) => pair(i));
    for (let i = 0; i < groups.length; i++) await t.addLot(`L${i}`, day(i), groups[i]);
    const chart = await computeCharacteristicChart(db, t.characteristicId);
    const xbarbar = mean(groups.map((g) => mean(g)));
    const rbar = mean(groups.map((g) => Math.max(...g) - Math.min(...g)));
    // Control chart constants for n = 2: A2 = 1.880, D3 = 0, D4 = 3.267 (ASTM E2587 table; NIST/SEMATECH e-Handbook 6.3.2, from memory).
    expect(chart.limits.location.center).toBeCloseTo(xbarbar, 9);
    expect(chart.limits.location.ucl).toBeCloseTo(xbarbar + 1.88 * rbar, 2);
    expect(chart.limits.location.lcl).toBeCloseTo(xbarbar - 1.88 * rbar, 2);
    expect(chart.limits.dispersion.ucl).toBeCloseTo(3.267 * rbar, 2);
    expect(chart.limits.dispersion.lcl).toBe(0);
    expect(chart.points[0].ucl).toBeCloseTo(chart.limits.location.ucl!, 12);
    expect(chart.limits.zones!.plus1 - chart.limits.location.center!).toBeCloseTo((chart.limits.location.ucl! - chart.limits.location.center!) / 3, 9);
    expect(chart.reasons.join(' ')).not.toMatch(/preliminary: trial/i);
  });

  it('charts an I–MR characteristic with MR-based limits (E2 = 2.66) and computes Pp and Ppk like simple-statistics', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'imr', subgroupSize: 1, specs: [{ lsl: 130, usl: 160, target: 145, effectiveFrom: day(-10) }] });
    const values = Array.from({ length: 30 }, (_, i) => 145 + ((i * 11) % 9) - 4);
    for (let i = 0; i < values.length; i++) await t.addLot(`I${i}`, day(i), [values[i]]);
    const chart = await computeCharacteristicChart(db, t.characteristicId);
    const mrbar = mean(values.slice(1).map((v, i) => Math.abs(v - values[i])));
    // E2 = 3/d2(2) = 2.66 (NIST/SEMATECH e-Handbook 6.3.2.2, from memory).
    expect(chart.limits.location.ucl).toBeCloseTo(mean(values) + 2.66 * mrbar, 1);
    expect(chart.points[0].dispersion).toBeNull();
    const s = sampleStandardDeviation(values);
    expect(chart.capability!.pp).toBeCloseTo(30 / (6 * s), 9);
    expect(chart.capability!.ppk).toBeCloseTo(Math.min(mean(values) - 130, 160 - mean(values)) / (3 * s), 9);
    expect(chart.spec).toEqual({ lsl: 130, usl: 160, target: 145, revision: 1 });
  });

  it('judges a lot by its mean against the specification revision in force when the lot was produced', async () => {
    const t = await createTestCharacteristic(db, {
      chartType: 'xbar-r',
      subgroupSize: 2,
      specs: [
        { lsl: 135, usl: 155, effectiveFrom: day(0, 0) },
        { lsl: 140, usl: 155, effectiveFrom: day(10, 0) },
      ],
    });
    await t.addLot('OLD', day(5), [138, 138]); // inside revision 1
    await t.addLot('MEAN', day(6), [133, 139]); // one value below 135, mean 136 inside: a set is judged by its mean, as EN 196-1 reports strength (from memory)
    await t.addLot('LOW', day(7), [130, 134]); // mean 132 below 135
    await t.addLot('NEW', day(12), [138, 138]); // below revision 2's 140
    const chart = await computeCharacteristicChart(db, t.characteristicId);
    expect(chart.points.map((p) => [p.lotNumber, p.outOfSpec])).toEqual([
      [t.lotNumber('OLD'), false],
      [t.lotNumber('MEAN'), false],
      [t.lotNumber('LOW'), true],
      [t.lotNumber('NEW'), true],
    ]);
    expect(chart.spec?.revision).toBe(2);
  });

  it('leaves voided results out of the chart', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
    await t.addLot('K1', day(1), [145, 146]);
    const gone = await t.addLot('K2', day(2), [190, 191]);
    await db.update(measurements).set({ voidedAt: new Date() }).where(sql`${measurements.id} = any(${sql.param(gone.measurementIds)}::int[])`);
    const chart = await computeCharacteristicChart(db, t.characteristicId);
    expect(chart.points.map((p) => p.lotNumber)).toEqual([t.lotNumber('K1')]);
  });

  it('shows the process events of the product, its line and the whole plant within the window', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
    await t.addLot('E1', day(1), [145, 146]);
    await t.addLot('E2', day(9), [145, 146]);
    const [plant] = await db.select({ id: plants.id }).from(plants).limit(1);
    const [other] = await db.select({ id: productionLines.id }).from(productionLines).where(eq(productionLines.code, 'L2'));
    const inserted = await db
      .insert(processEvents)
      .values([
        { plantId: plant.id, productId: t.productId, lineId: t.lineId, occurredAt: new Date(day(3)), title: 'Sand source changed' },
        { plantId: plant.id, occurredAt: new Date(day(4)), title: 'Plant-wide power cut' },
        { plantId: plant.id, lineId: other.id, occurredAt: new Date(day(5)), title: 'Other line dosing scale recalibrated' },
        { plantId: plant.id, lineId: t.lineId, occurredAt: new Date(day(-30)), title: 'Before the first lot' },
      ])
      .returning({ id: processEvents.id, title: processEvents.title });
    const chart = await computeCharacteristicChart(db, t.characteristicId);
    const titles = chart.events.map((e) => e.title);
    expect(titles.slice(0, 2)).toEqual(['Sand source changed', 'Plant-wide power cut']);
    expect(titles).not.toContain('Other line dosing scale recalibrated');
    expect(titles).not.toContain('Before the first lot');
    const windowed = await computeCharacteristicChart(db, t.characteristicId, { from: new Date(day(2)), to: new Date(day(20)) });
    expect(windowed.points.map((p) => p.lotNumber)).toEqual([t.lotNumber('E2')]);
    expect(windowed.events.map((e) => e.title)).toEqual(['Sand source changed', 'Plant-wide power cut']);
    await db.delete(processEvents).where(sql`${processEvents.id} = any(${sql.param(inserted.map((e) => e.id))}::int[])`);
  });
});

describe('exclusions and frozen limits', () => {
  it('leaves an excluded point out of the estimate and the rules, keeps it plotted, and records both changes', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
    const groups = Array.from({ length: 24 }, (_, i) => pair(i));
    groups[12] = [175, 176]; // a miscalibrated press reading
    for (let i = 0; i < groups.length; i++) await t.addLot(`X${i}`, day(i), groups[i]);
    const manager = await userIdByEmail(db, 'manager@harrowvale.example');
    const before = await computeCharacteristicChart(db, t.characteristicId);
    expect(before.points[12].rules).toContain('we1');

    const lotId = await lotIdOf(t.lotNumber('X12'));
    await excludePoint(db, { characteristicId: t.characteristicId, lotId, reason: 'Press found out of calibration', userId: manager });
    await expect(excludePoint(db, { characteristicId: t.characteristicId, lotId, reason: 'again', userId: manager })).rejects.toMatchObject({ status: 409 });
    const after = await computeCharacteristicChart(db, t.characteristicId);
    expect(after.points[12]).toMatchObject({ excluded: true, exclusionReason: 'Press found out of calibration', rules: [] });
    const kept = groups.filter((_, i) => i !== 12);
    expect(after.limits.location.center).toBeCloseTo(mean(kept.map((g) => mean(g))), 9);
    expect(after.violations.some((v) => v.index === 12)).toBe(false);

    await includePoint(db, { characteristicId: t.characteristicId, lotId, reason: 'Calibration certificate was fine after all', userId: manager });
    const back = await computeCharacteristicChart(db, t.characteristicId);
    expect(back.points[12].excluded).toBe(false);
    expect(back.limits.location.center).toBeCloseTo(before.limits.location.center!, 12);

    const audit = await db.select({ action: auditEvents.action, reason: auditEvents.reason, actorId: auditEvents.actorId }).from(auditEvents)
      .where(and(eq(auditEvents.entity, 'characteristic'), eq(auditEvents.entityId, String(t.characteristicId)))).orderBy(auditEvents.id);
    expect(audit).toEqual([
      { action: 'exclude point', reason: 'Press found out of calibration', actorId: manager },
      { action: 'include point', reason: 'Calibration certificate was fine after all', actorId: manager },
    ]);
  });

  it('judges later lots against frozen limits (phase II), revised limits from their baseline on, and keeps superseded revisions', async () => {
    const t = await createTestCharacteristic(db, { chartType: 'xbar-r', subgroupSize: 2 });
    const baseline = Array.from({ length: 20 }, (_, i) => pair(i));
    for (let i = 0; i < baseline.length; i++) await t.addLot(`F${i}`, day(i), baseline[i]);
    const manager = await userIdByEmail(db, 'manager@harrowvale.example');
    const first = await freezeLimits(db, { characteristicId: t.characteristicId, baselineFrom: new Date(day(0)), baselineTo: new Date(day(19)), reason: 'Process stable after commissioning', userId: manager });
    const rbar = mean(baseline.map((g) => Math.max(...g) - Math.min(...g)));
    const xbarbar = mean(baseline.map((g) => mean(g)));
    // A2 = 1.880 for n = 2 (ASTM E2587, from memory).
    expect(first).toMatchObject({ revision: 1, chartType: 'xbar-r', subgroupSize: 2, baselinePoints: 20, supersededAt: null });
    expect(first.locationUcl).toBeCloseTo(xbarbar + 1.88 * rbar, 2);

    // After a new sand source the flow steps up: the frozen limits flag it, trial limits would move with it.
    for (let i = 0; i < 10; i++) await t.addLot(`G${i}`, day(20 + i), [158 + (i % 2), 159]);
    const chart = await computeCharacteristicChart(db, t.characteristicId);
    expect(chart.limits).toMatchObject({ source: 'frozen', revisionId: first.id, reason: 'Process stable after commissioning', frozenBy: 'Demo Quality Manager' });
    expect(chart.limits.location.center).toBeCloseTo(xbarbar, 9);
    expect(chart.points.slice(20).every((p) => p.rules.includes('we1'))).toBe(true);

    const second = await freezeLimits(db, { characteristicId: t.characteristicId, baselineFrom: new Date(day(20)), baselineTo: new Date(day(29)), reason: 'New sand source accepted', userId: manager });
    const history = await limitRevisions(db, t.characteristicId);
    expect(history.map((r) => [r.revision, r.supersededAt === null])).toEqual([[2, true], [1, false]]);
    expect(second.center).toBeCloseTo(mean(Array.from({ length: 10 }, (_, i) => mean([158 + (i % 2), 159]))), 9);

    // Revised limits judge the lots from the start of their baseline on; the lots before it keep the
    // limits of their time (common practice: limits are recalculated from the new level after an
    // assignable cause, not laid back over data they were not computed from).
    const revised = await computeCharacteristicChart(db, t.characteristicId);
    expect(revised.limits).toMatchObject({ source: 'frozen', revisionId: second.id, reason: 'New sand source accepted' });
    for (const p of revised.points.slice(0, 20)) {
      expect(p.center).toBeCloseTo(first.center, 9);
      expect(p.ucl).toBeCloseTo(first.locationUcl, 9);
    }
    for (const p of revised.points.slice(20)) {
      expect(p.center).toBeCloseTo(second.center, 9);
      expect(p.ucl).toBeCloseTo(second.locationUcl, 9);
    }
    expect(revised.violations.filter((v) => v.index >= 20)).toEqual([]);
    expect(chart.violations.filter((v) => v.index < 20)).toEqual(revised.violations.filter((v) => v.index < 20));

    // A later revision whose baseline starts earlier takes over from its own start.
    const third = await freezeLimits(db, { characteristicId: t.characteristicId, baselineFrom: new Date(day(0)), baselineTo: new Date(day(29)), reason: 'Both sands in one baseline', userId: manager });
    const merged = await computeCharacteristicChart(db, t.characteristicId);
    expect(merged.points.every((p) => Math.abs(p.center! - third.center) < 1e-9)).toBe(true);
    expect(merged.limits.revisionId).toBe(third.id);
    const audit = await db.select({ n: sql<number>`count(*)::int` }).from(auditEvents)
      .where(and(eq(auditEvents.action, 'freeze limits'), eq(auditEvents.entityId, String(t.characteristicId))));
    expect(audit[0].n).toBe(3);
    await expect(freezeLimits(db, { characteristicId: t.characteristicId, baselineFrom: new Date(day(100)), baselineTo: new Date(day(120)), reason: 'empty', userId: manager })).rejects.toMatchObject({ status: 422 });
    await expect(freezeLimits(db, { characteristicId: t.characteristicId, baselineFrom: new Date(day(0)), baselineTo: new Date(day(19)), reason: ' ', userId: manager })).rejects.toMatchObject({ status: 400 });
  });
});
