import { Router } from 'express';
import { eq } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { characteristics } from '@api/db/schema';
import { excludePoint, freezeLimits, includePoint } from '@api/spc/chart-commands';
import { limitRevisions, resolveChartWindow, type LimitRevision } from '@api/spc/chart-load';
import type { ResultsChanged } from '@api/spc/results-changed';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import type { LimitRevisionRecord } from '@shared/schemas/charts';
import { chartCacheFor } from './chart-cache';
import { characteristicParamsSchema, chartQuerySchema, excludePointSchema, exclusionParamsSchema, freezeLimitsSchema, includePointSchema } from './schema';

function revisionJson(r: LimitRevision): LimitRevisionRecord {
  return {
    id: r.id,
    revision: r.revision,
    chartType: r.chartType,
    subgroupSize: r.subgroupSize,
    center: r.center,
    sigmaWithin: r.sigmaWithin,
    locationUcl: r.locationUcl,
    locationLcl: r.locationLcl,
    dispersionCenter: r.dispersionCenter,
    dispersionUcl: r.dispersionUcl,
    dispersionLcl: r.dispersionLcl,
    baselineFrom: r.baselineFrom.toISOString(),
    baselineTo: r.baselineTo.toISOString(),
    baselinePoints: r.baselinePoints,
    reason: r.reason,
    createdByName: r.createdByName,
    createdAt: r.createdAt.toISOString(),
    supersededAt: r.supersededAt ? r.supersededAt.toISOString() : null,
  };
}

/**
 * One characteristic's control chart, its exclusions and its frozen-limit revisions. Every role
 * reads; quality managers and administrators change what the limits are computed from, and the
 * alarms follow in an incremental run (resultsChanged, because 'limits').
 */
export function chartsRouter(db: Database, resultsChanged: ResultsChanged): Router {
  const router = Router();
  const cache = chartCacheFor(db);
  router.use(requireSession);

  router.get('/:id/chart', async (req, res) => {
    const { id } = parseBody(characteristicParamsSchema, req.params);
    const window = await resolveChartWindow(db, id, parseBody(chartQuerySchema, req.query));
    const cached = await cache.get(id, window);
    // The version tag lets a browser that already holds this state of the chart revalidate for free.
    res.set({ 'Content-Type': 'application/json; charset=utf-8', 'Cache-Control': 'private, no-cache', ETag: cached.etag, Vary: 'Accept-Encoding' });
    if (req.fresh) {
      res.status(304).end();
      return;
    }
    // A long chart is megabytes of JSON: a browser gets it gzipped, compressed once per state of the data.
    if (req.acceptsEncodings('gzip', 'identity') === 'gzip') {
      res.set('Content-Encoding', 'gzip');
      res.end(cached.gzipped());
      return;
    }
    res.end(cached.body());
  });

  router.post('/:id/exclusions', requirePermission('point.exclude'), async (req, res) => {
    const { id } = parseBody(characteristicParamsSchema, req.params);
    const { lotId, reason } = parseBody(excludePointSchema, req.body);
    const row = await excludePoint(db, { characteristicId: id, lotId, reason, userId: req.user!.id });
    await resultsChanged({ characteristicIds: [id], because: 'limits', by: req.user!.id });
    res.status(201).json({ id: row.id, characteristicId: id, lotId });
  });

  router.delete('/:id/exclusions/:lotId', requirePermission('point.exclude'), async (req, res) => {
    const { id, lotId } = parseBody(exclusionParamsSchema, req.params);
    const { reason } = parseBody(includePointSchema, req.body ?? {});
    const row = await includePoint(db, { characteristicId: id, lotId, reason, userId: req.user!.id });
    await resultsChanged({ characteristicIds: [id], because: 'limits', by: req.user!.id });
    res.json({ id: row.id, characteristicId: id, lotId });
  });

  router.get('/:id/limit-revisions', async (req, res) => {
    const { id } = parseBody(characteristicParamsSchema, req.params);
    // An unknown characteristic is a 404, not an empty history.
    const [found] = await db.select({ id: characteristics.id }).from(characteristics).where(eq(characteristics.id, id));
    if (!found) throw notFound(`Characteristic ${id}`);
    res.json({ items: (await limitRevisions(db, id)).map(revisionJson) });
  });

  router.post('/:id/limit-revisions', requirePermission('limits.freeze'), async (req, res) => {
    const { id } = parseBody(characteristicParamsSchema, req.params);
    const input = parseBody(freezeLimitsSchema, req.body);
    const revision = await freezeLimits(db, { characteristicId: id, ...input, userId: req.user!.id });
    await resultsChanged({ characteristicIds: [id], because: 'limits', by: req.user!.id });
    res.status(201).json(revisionJson(revision));
  });

  return router;
}
