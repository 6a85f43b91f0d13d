import { afterAll, describe, expect, it } from 'vitest';
import { eq, sql } from 'drizzle-orm';
import { mean, sampleStandardDeviation } from 'simple-statistics';
import { createDatabase } from '../db/client';
import { measurements, plants, processEvents, productionLines } from '../db/schema';
import { databaseUrl } from '@tests/support/api';
import { computeCharacteristicChart } from './chart-load';
import { createTestCharacteristic, removeTestCharacteristics, testDay as day, testPair as pair } from '@tests/support/plant';

const db = createDatabase(databaseUrl(), 4);
afterAll(async () => {
  await removeTestCharacteristics(db);
  await db.$client.end();
});

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
