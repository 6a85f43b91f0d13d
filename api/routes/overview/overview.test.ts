// The overview endpoint against the seeded demo plant.
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { createTestApi } from '@tests/support/api';
import { isDemoCode } from '@tests/support/catalogue';
import { alarms, characteristics, lots, products, uploads } from '@api/db/schema';
import { plantedCausesFor } from '@api/db/seed/scenario';
import { demoEndDate } from '@api/db/seed';
import type { CharacteristicChart } from '@shared/schemas/charts';
import type { Overview } from '@shared/schemas/overview';
import type { Role } from '@shared/schemas/users';

const api = createTestApi();
afterAll(() => api.close());

const as = async (role: Role) => ({ authorization: `Bearer ${await api.tokenFor(role)}` });

async function overview(query = '', role: Role = 'quality_manager'): Promise<Overview> {
  const res = await request(api.app).get(`/api/v1/overview${query}`).set(await as(role));
  expect(res.status).toBe(200);
  return res.body as Overview;
}

describe('GET /api/v1/overview', () => {
  it('lists every active characteristic with its line, product, latest lot and control state', async () => {
    const body = await overview('?days=30', 'technician');
    // Counted over the demo plant's records: catalogue tests running beside this file add their own.
    const active = await api.db
      .select({ code: characteristics.code })
      .from(characteristics)
      .innerJoin(products, eq(products.id, characteristics.productId))
      .where(and(eq(characteristics.active, true), eq(products.active, true)));
    expect(body.items.filter((i) => isDemoCode(i.code))).toHaveLength(active.filter((c) => isDemoCode(c.code)).length);
    expect(body.days).toBe(30);
    expect(body.lines.map((l) => l.code).filter(isDemoCode)).toEqual(['L1', 'L2']);
    // The families offered are those of the listed products, the demo plant's three among them.
    expect(body.families).toEqual([...new Set(body.items.map((i) => i.productFamily))].sort());
    expect(body.families).toEqual(expect.arrayContaining(['levelling', 'repair', 'tile-adhesive']));

    const flow = body.items.find((i) => i.code === 'HVL25-FLOW')!;
    // The demo's manager recalculated the flow limits after the new sand source: phase II.
    expect(flow).toMatchObject({ lineCode: 'L1', productName: 'HV Level 25', productFamily: 'levelling', chartType: 'xbar-r', unit: 'mm', limitsSource: 'frozen' });
    expect(flow.trend.length).toBeGreaterThan(10);
    // The planted lot of HV Level 25 far above its density limit, three weeks back, is a signal of the period.
    const density = body.items.find((i) => i.code === 'HVL25-DENS')!;
    expect(density.controlState).toBe('signal');
    expect(density.signals).toBeGreaterThan(0);
    expect(density.attention.join(' ')).toMatch(/Run-rule signal/);

    // The latest lot is the newest lot of the product that has a flow result.
    const [newest] = await api.db.execute<{ lot_number: string }>(sql`
      select l.lot_number from lots l join measurements m on m.lot_id = l.id
      where m.characteristic_id = ${flow.id} and m.voided_at is null order by l.produced_at desc, l.lot_number desc limit 1`).then((r) => r.rows);
    expect(flow.latest?.lotNumber).toBe(newest.lot_number);
  });

  it('gives the Cpk of the period, the same figure the chart of that period shows', async () => {
    const body = await overview('?days=90');
    const density = body.items.find((i) => i.code === 'HVL25-DENS')!;
    const chartRes = await request(api.app)
      .get(`/api/v1/characteristics/${density.id}/chart?from=${encodeURIComponent(body.from)}`)
      .set(await as('auditor'));
    const chart = chartRes.body as CharacteristicChart;
    expect(density.cpk).not.toBeNull();
    expect(density.cpk).toBeCloseTo(chart.capability!.cpk!, 9);
    expect(density.cpkCi95).toEqual(chart.capability!.cpkCi95);
    // The period starts 90 days back, on the hour.
    expect(Date.now() - Date.parse(body.from)).toBeGreaterThanOrEqual(90 * 86_400_000);
    expect(Date.now() - Date.parse(body.from)).toBeLessThan(90 * 86_400_000 + 3_600_000);
  });

  it('narrows by line and by product family', async () => {
    const line2 = await overview('?line=L2');
    expect(line2.items.length).toBeGreaterThan(0);
    expect(new Set(line2.items.map((i) => i.productCode))).toEqual(new Set(['HVFX', 'HVR3']));
    const levelling = await overview('?family=levelling');
    expect(new Set(levelling.items.map((i) => i.productCode))).toEqual(new Set(['HVL25', 'HVLF']));
    const none = await overview('?line=L9');
    expect(none.items).toEqual([]);
  });

  it('counts open alarms per characteristic and ranks them for attention', async () => {
    const body = await overview('?days=182');
    // The one with the fewest open alarms, so that two more still move it up (the count weighs up to five).
    const target = body.items.filter((i) => i.latest).reduce((a, b) => (b.openAlarms < a.openAlarms ? b : a));
    expect(target.openAlarms).toBeLessThan(4);
    const [lot] = await api.db.select({ id: lots.id }).from(lots).where(eq(lots.lotNumber, (await latestLot(target.id))!));
    const inserted = await api.db
      .insert(alarms)
      .values([
        { characteristicId: target.id, lotId: lot.id, rule: 'we1', chart: 'overview-test', pointIndex: 0, statistic: 1, values: [1], description: 'test alarm one', source: 'test', status: 'open' },
        { characteristicId: target.id, lotId: lot.id, rule: 'we2', chart: 'overview-test', pointIndex: 0, statistic: 1, values: [1], description: 'test alarm two', source: 'test', status: 'open' },
        { characteristicId: target.id, lotId: lot.id, rule: 'we3', chart: 'overview-test', pointIndex: 0, statistic: 1, values: [1], description: 'test alarm closed', source: 'test', status: 'closed' },
      ])
      .returning({ id: alarms.id });
    try {
      const again = await overview('?days=182');
      const item = again.items.find((i) => i.id === target.id)!;
      expect(item.openAlarms).toBe(target.openAlarms + 2);
      expect(item.attention).toContain(`${target.openAlarms + 2} open alarms`);
      expect(item.attentionScore).toBeGreaterThan(target.attentionScore);
    } finally {
      for (const { id } of inserted) await api.db.delete(alarms).where(eq(alarms.id, id));
    }
  });

  it('marks the planted out-of-specification lots of the period', async () => {
    // The seed's own end date, not today's: a suite that runs across midnight must not move the planted lots.
    const [history] = await api.db.select({ uploadedAt: uploads.uploadedAt }).from(uploads).where(eq(uploads.fileName, 'harrow-vale-history.csv'));
    const causes = plantedCausesFor({ endDate: demoEndDate(history.uploadedAt) }).filter((c) => c.kind === 'out-of-spec-lot');
    const body = await overview('?days=182');
    for (const cause of causes) {
      const item = body.items.find((i) => i.code === cause.characteristicCodes[0])!;
      expect(item.outOfSpecCount, cause.id).toBeGreaterThanOrEqual(1);
      expect(item.attention.join(' '), cause.id).toMatch(/outside the specification/);
    }
  });

  it('never contradicts itself on a card: every signal on the trend, no "in control" beside an open alarm, no interval from one lot', async () => {
    for (const days of [30, 182]) {
      const body = await overview(`?days=${days}`);
      const demo = body.items.filter((i) => isDemoCode(i.code));
      for (const i of demo) {
        const where = `${i.code}, ${days} days`;
        expect(i.trend.some((t) => t.signal), where).toBe(i.signals > 0);
        expect(i.trend.some((t) => t.outOfSpec), where).toBe(i.outOfSpecCount > 0);
        if (i.openAlarms > 0) expect(i.controlState, where).not.toBe('in-control');
        if (i.pointsInPeriod < 2) expect([i.cpk, i.cpkCi95, i.capabilityEnough], where).toEqual([null, null, false]);
        // What is printed is what was compared: the printed index is below the printed limit.
        for (const a of i.attention) {
          const m = /^Cpk (\S+) is below (\S+)$/.exec(a);
          if (m) expect(Number(m[1]), `${where}: ${a}`).toBeLessThan(Number(m[2]));
        }
      }
      expect(demo.some((i) => i.controlState === 'alarms-open' || i.openAlarms === 0)).toBe(true);
    }
  });

  it('refuses a period it does not offer', async () => {
    const res = await request(api.app).get('/api/v1/overview?days=5').set(await as('auditor'));
    expect(res.status).toBe(400);
    expect(res.body.error).toBe('days: days must be one of 7, 30, 90, 182');
  });
});

async function latestLot(characteristicId: number): Promise<string | undefined> {
  const res = await api.db.execute<{ lot_number: string }>(sql`
    select l.lot_number from lots l join measurements m on m.lot_id = l.id
    where m.characteristic_id = ${characteristicId} order by l.produced_at desc limit 1`);
  return res.rows[0]?.lot_number;
}
