import { Router } from 'express';
import { and, asc, eq, isNull, sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { alarms, characteristics, lotHolds, lots, productionLines, products, testMethods } from '@api/db/schema';
import { parseBody } from '@api/http/errors';
import { lotStatusSql } from '@api/lots/holds';
import { requireSession } from '@api/auth/session';
import { OVERVIEW_HELD_LOTS, type Overview, type OverviewItem } from '@shared/schemas/overview';
import { chartCacheFor } from '../charts/chart-cache';
import { summarise, type OverviewBase } from './summary';
import { overviewQuerySchema } from './schema';

const HOUR = 3_600_000;
const DAY = 24 * HOUR;
/** Charts computed at once on a cold cache; the pool has ten connections for every request. */
const PARALLEL = 4;

async function eachLimited<T, R>(items: T[], limit: number, work: (item: T) => Promise<R>): Promise<R[]> {
  const out = new Array<R>(items.length);
  let next = 0;
  const runners = Array.from({ length: Math.min(limit, items.length) }, async () => {
    while (next < items.length) {
      const i = next++;
      out[i] = await work(items[i]);
    }
  });
  await Promise.all(runners);
  return out;
}

/** The plant at a glance: every active characteristic with its latest result, control state, alarms and Cpk. */
export function overviewRouter(db: Database): Router {
  const router = Router();
  const cache = chartCacheFor(db);

  router.get('/', requireSession, async (req, res) => {
    const q = parseBody(overviewQuerySchema, req.query);
    const now = Date.now();
    // The period starts on the hour, so its charts stay cached for the hour.
    const from = new Date(Math.floor((now - q.days * DAY) / HOUR) * HOUR);

    const rows: OverviewBase[] = await db
      .select({
        id: characteristics.id,
        code: characteristics.code,
        name: characteristics.name,
        unit: characteristics.unit,
        decimals: testMethods.decimals,
        chartType: characteristics.chartType,
        productCode: products.code,
        productName: products.name,
        productFamily: products.family,
        lineCode: productionLines.code,
        lineName: productionLines.name,
      })
      .from(characteristics)
      .innerJoin(products, eq(products.id, characteristics.productId))
      .innerJoin(testMethods, eq(testMethods.id, characteristics.testMethodId))
      .leftJoin(productionLines, eq(productionLines.id, products.lineId))
      .where(
        and(
          eq(characteristics.active, true),
          eq(products.active, true),
          q.line ? eq(productionLines.code, q.line) : undefined,
          q.family ? eq(products.family, q.family) : undefined,
        ),
      )
      .orderBy(asc(productionLines.code), asc(products.code), asc(characteristics.id));

    const [lineRows, familyRows, alarmRows, versions] = await Promise.all([
      db.select({ code: productionLines.code, name: productionLines.name }).from(productionLines).orderBy(asc(productionLines.code)),
      db.selectDistinct({ family: products.family }).from(products).where(eq(products.active, true)).orderBy(asc(products.family)),
      db
        .select({ characteristicId: alarms.characteristicId, n: sql<number>`count(*)::int` })
        .from(alarms)
        .where(eq(alarms.status, 'open'))
        .groupBy(alarms.characteristicId),
      cache.versions(rows.map((r) => r.id)),
    ]);
    // Lots on hold by the one rule of a lot's standing, oldest hold first: the longest wait for a decision comes first.
    const heldWhere = and(
      isNull(lotHolds.releasedAt),
      sql`${lotStatusSql(sql`${lots.id}`)} = 'on-hold'`,
      q.line ? eq(productionLines.code, q.line) : undefined,
      q.family ? eq(products.family, q.family) : undefined,
    );
    const [heldRows, [heldCount]] = await Promise.all([
      db
        .select({ lotNumber: lots.lotNumber, productCode: products.code, lineCode: productionLines.code, reason: lotHolds.reason, source: lotHolds.source, heldSince: lotHolds.placedAt })
        .from(lotHolds)
        .innerJoin(lots, eq(lots.id, lotHolds.lotId))
        .innerJoin(products, eq(products.id, lots.productId))
        .innerJoin(productionLines, eq(productionLines.id, lots.lineId))
        .where(heldWhere)
        .orderBy(asc(lotHolds.placedAt), asc(lotHolds.id))
        .limit(OVERVIEW_HELD_LOTS),
      db
        .select({ n: sql<number>`count(*)::int` })
        .from(lotHolds)
        .innerJoin(lots, eq(lots.id, lotHolds.lotId))
        .innerJoin(products, eq(products.id, lots.productId))
        .innerJoin(productionLines, eq(productionLines.id, lots.lineId))
        .where(heldWhere),
    ]);
    const openAlarms = new Map(alarmRows.map((a) => [a.characteristicId, a.n]));

    const items: OverviewItem[] = await eachLimited(rows, PARALLEL, async (row) => {
      const version = versions.get(row.id);
      const full = await cache.get(row.id, {}, version);
      const recent = await cache.get(row.id, { from }, version);
      return summarise(row, full.chart, recent.chart, from, openAlarms.get(row.id) ?? 0);
    });

    const body: Overview = {
      generatedAt: new Date(now).toISOString(),
      days: q.days,
      from: from.toISOString(),
      lines: lineRows,
      families: familyRows.map((f) => f.family),
      items,
      heldLots: { count: heldCount.n, items: heldRows.map((h) => ({ ...h, heldSince: h.heldSince.toISOString() })) },
    };
    res.json(body);
  });

  return router;
}
