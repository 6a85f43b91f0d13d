// The quality manager's decisions on a chart: exclude a point, take it back in, freeze limits from a
// baseline. Each is one transaction under the characteristic's lock, with its audit event; a refusal
// is a DomainError that the route turns into an HTTP answer.
import { and, desc, eq, isNull, sql } from 'drizzle-orm';
import { recordAudit } from '../db/audit';
import type { Database } from '../db/client';
import { controlLimitRevisions, lots, measurements, pointExclusions } from '../db/schema';
import { buildChart } from './chart-assembly';
import { limitRevisions, loadChartInputs, type LimitRevision } from './chart-load';
import { CHARACTERISTIC_LOCK, type Executor } from './db';
import { DomainError } from './errors';

const requireReason = (reason: string) => {
  if (!reason || !reason.trim()) throw new DomainError('invalid', 'reason: say why, for the audit trail');
  return reason.trim();
};

export interface FreezeRequest {
  characteristicId: number;
  baselineFrom: Date;
  baselineTo: Date;
  reason: string;
  userId: number;
}

/**
 * Freezes phase I limits from a baseline window (exclusions left out) as the new revision in force;
 * the previous revision is superseded, not changed.
 */
export async function freezeLimits(db: Database, req: FreezeRequest): Promise<LimitRevision> {
  const reason = requireReason(req.reason);
  if (!(req.baselineFrom.getTime() <= req.baselineTo.getTime())) throw new DomainError('invalid', 'baselineFrom must not be after baselineTo');
  const id = await db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${CHARACTERISTIC_LOCK}, ${req.characteristicId})`);
    const inputs = await loadChartInputs(tx, req.characteristicId, { from: req.baselineFrom, to: req.baselineTo });
    if (!inputs) throw new DomainError('not-found', `Characteristic ${req.characteristicId} not found`);
    const { result } = buildChart({ ...inputs, revisions: [] });
    const kept = inputs.lots.filter((l) => !inputs.exclusions.has(l.lotId)).length;
    if (kept === 0) throw new DomainError('not-possible', 'The baseline window holds no kept points');
    if (result.sigmaWithin === null || result.location.center === null || result.location.ucl === null || result.location.lcl === null) {
      throw new DomainError('not-possible', `Limits cannot be frozen from this baseline: ${result.reasons.map((r) => r.message).join(' ') || 'sigma within cannot be estimated.'}`);
    }
    if (result.sigmaWithin === 0) throw new DomainError('not-possible', 'The baseline shows no variation within subgroups, so frozen limits would collapse onto the centre line');
    const [previous] = await tx
      .select({ id: controlLimitRevisions.id, revision: controlLimitRevisions.revision, center: controlLimitRevisions.center, sigmaWithin: controlLimitRevisions.sigmaWithin })
      .from(controlLimitRevisions)
      .where(eq(controlLimitRevisions.characteristicId, req.characteristicId))
      .orderBy(desc(controlLimitRevisions.revision))
      .limit(1);
    await tx
      .update(controlLimitRevisions)
      .set({ supersededAt: sql`now()` })
      .where(and(eq(controlLimitRevisions.characteristicId, req.characteristicId), isNull(controlLimitRevisions.supersededAt)));
    const [row] = await tx
      .insert(controlLimitRevisions)
      .values({
        characteristicId: req.characteristicId,
        revision: (previous?.revision ?? 0) + 1,
        chartType: result.chart,
        subgroupSize: result.limitsSubgroupSize,
        center: result.location.center,
        sigmaWithin: result.sigmaWithin,
        locationUcl: result.location.ucl,
        locationLcl: result.location.lcl,
        dispersionCenter: result.dispersion.center,
        dispersionUcl: result.dispersion.ucl,
        dispersionLcl: result.dispersion.lcl,
        baselineFrom: req.baselineFrom,
        baselineTo: req.baselineTo,
        baselinePoints: kept,
        reason,
        createdBy: req.userId,
      })
      .returning({ id: controlLimitRevisions.id, revision: controlLimitRevisions.revision });
    await recordAudit(tx, {
      actorId: req.userId,
      action: 'freeze limits',
      entity: 'characteristic',
      entityId: req.characteristicId,
      before: previous ? { revision: previous.revision, center: previous.center, sigmaWithin: previous.sigmaWithin } : null,
      after: { revision: row.revision, center: result.location.center, sigmaWithin: result.sigmaWithin, ucl: result.location.ucl, lcl: result.location.lcl, baselinePoints: kept },
      reason,
    });
    return row.id;
  });
  const all = await limitRevisions(db, req.characteristicId);
  return all.find((r) => r.id === id)!;
}

export interface PointRequest {
  characteristicId: number;
  lotId: number;
  reason: string;
  userId: number;
}

/** Leaves a lot's point out of the limits and the run rules of one characteristic (still plotted); inside a caller's transaction too (closing an alarm). */
export async function excludePoint(db: Executor, req: PointRequest): Promise<{ id: number }> {
  const reason = requireReason(req.reason);
  return db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${CHARACTERISTIC_LOCK}, ${req.characteristicId})`);
    const [live] = await tx
      .select({ n: sql<number>`count(*)::int` })
      .from(measurements)
      .innerJoin(lots, eq(lots.id, measurements.lotId))
      .where(and(eq(measurements.characteristicId, req.characteristicId), eq(measurements.lotId, req.lotId), isNull(measurements.voidedAt)));
    if (!live || live.n === 0) throw new DomainError('not-found', `A point of lot ${req.lotId} on characteristic ${req.characteristicId} not found`);
    const [existing] = await tx
      .select({ id: pointExclusions.id })
      .from(pointExclusions)
      .where(and(eq(pointExclusions.characteristicId, req.characteristicId), eq(pointExclusions.lotId, req.lotId), isNull(pointExclusions.removedAt)));
    if (existing) throw new DomainError('conflict', 'This point is already excluded');
    const [row] = await tx.insert(pointExclusions).values({ characteristicId: req.characteristicId, lotId: req.lotId, reason, createdBy: req.userId }).returning({ id: pointExclusions.id });
    await recordAudit(tx, { actorId: req.userId, action: 'exclude point', entity: 'characteristic', entityId: req.characteristicId, after: { lotId: req.lotId, exclusionId: row.id }, reason });
    return row;
  });
}

/** Takes an excluded point back into the limits and run rules; the exclusion stays on record. */
export async function includePoint(db: Database, req: PointRequest): Promise<{ id: number }> {
  const reason = requireReason(req.reason);
  return db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(${CHARACTERISTIC_LOCK}, ${req.characteristicId})`);
    const [row] = await tx
      .update(pointExclusions)
      .set({ removedAt: sql`now()`, removedBy: req.userId, removalReason: reason })
      .where(and(eq(pointExclusions.characteristicId, req.characteristicId), eq(pointExclusions.lotId, req.lotId), isNull(pointExclusions.removedAt)))
      .returning({ id: pointExclusions.id, reason: pointExclusions.reason });
    if (!row) throw new DomainError('not-found', `An exclusion of lot ${req.lotId} on characteristic ${req.characteristicId} not found`);
    await recordAudit(tx, { actorId: req.userId, action: 'include point', entity: 'characteristic', entityId: req.characteristicId, before: { lotId: req.lotId, exclusionId: row.id, reason: row.reason }, reason });
    return { id: row.id };
  });
}
