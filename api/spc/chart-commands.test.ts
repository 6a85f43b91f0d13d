import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, sql } from 'drizzle-orm';
import { mean } from 'simple-statistics';
import { createDatabase } from '../db/client';
import { auditEvents, lots } from '../db/schema';
import { databaseUrl } from '@tests/support/api';
import { excludePoint, freezeLimits, includePoint } from './chart-commands';
import { computeCharacteristicChart, limitRevisions } from './chart-load';
import { createTestCharacteristic, removeTestCharacteristics, testDay as day, testPair as pair, userIdByEmail } from '@tests/support/plant';

const db = createDatabase(databaseUrl(), 4);
afterAll(async () => {
  await removeTestCharacteristics(db);
  await db.$client.end();
});

async function lotIdOf(lotNumber: string) {
  const [row] = await db.select({ id: lots.id }).from(lots).where(eq(lots.lotNumber, lotNumber));
  return row.id;
}

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
    await expect(excludePoint(db, { characteristicId: t.characteristicId, lotId, reason: 'again', userId: manager })).rejects.toMatchObject({ kind: 'conflict', message: 'This point is already excluded' });
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
    await expect(freezeLimits(db, { characteristicId: t.characteristicId, baselineFrom: new Date(day(100)), baselineTo: new Date(day(120)), reason: 'empty', userId: manager })).rejects.toMatchObject({ kind: 'not-possible', message: 'The baseline window holds no kept points' });
    await expect(freezeLimits(db, { characteristicId: t.characteristicId, baselineFrom: new Date(day(0)), baselineTo: new Date(day(19)), reason: ' ', userId: manager })).rejects.toMatchObject({ kind: 'invalid' });
  });
});
