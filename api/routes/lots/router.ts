import { Router } from 'express';
import { and, asc, desc, eq, ilike, isNull, sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { characteristics, lots, measurements, productionLines, products, uploads } from '@api/db/schema';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import type { Json } from '@api/http/json';
import type { LotListItem } from '@shared/schemas/lots';
import { listLotsQuerySchema, lotParamsSchema } from './schema';

/** Lots as produced, and one lot with its live results and the specification revisions that judge it: every signed-in role reads them. */
export function lotsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', requirePermission('plant.read'), async (req, res) => {
    const q = parseBody(listLotsQuerySchema, req.query);
    const rows = await db
      .select({ id: lots.id, lotNumber: lots.lotNumber, producedAt: lots.producedAt, shift: lots.shift, productCode: products.code, lineCode: productionLines.code })
      .from(lots)
      .innerJoin(products, eq(products.id, lots.productId))
      .innerJoin(productionLines, eq(productionLines.id, lots.lineId))
      .where(and(q.product ? eq(products.code, q.product) : undefined, q.q ? ilike(lots.lotNumber, `${q.q.replace(/[%_\\]/g, '\\$&')}%`) : undefined))
      // A lot number typed in full comes before the lots whose number merely starts with it.
      .orderBy(...(q.q ? [desc(sql`lower(${lots.lotNumber}) = lower(${q.q})`)] : []), desc(lots.producedAt))
      .limit(q.limit);
    res.json({ items: rows satisfies Json<LotListItem>[] });
  });

  router.get('/:lotNumber', async (req, res) => {
    const { lotNumber } = parseBody(lotParamsSchema, req.params);
    const [lot] = await db
      .select({ id: lots.id, lotNumber: lots.lotNumber, producedAt: lots.producedAt, shift: lots.shift, productCode: products.code, productName: products.name, lineCode: productionLines.code })
      .from(lots)
      .innerJoin(products, eq(products.id, lots.productId))
      .innerJoin(productionLines, eq(productionLines.id, lots.lineId))
      .where(eq(lots.lotNumber, lotNumber));
    if (!lot) throw notFound(`Lot ${lotNumber}`);
    const results = await db
      .select({
        id: measurements.id,
        characteristicCode: characteristics.code,
        characteristicName: characteristics.name,
        unit: characteristics.unit,
        replicate: measurements.replicate,
        value: measurements.value,
        testedAt: measurements.testedAt,
        operator: measurements.operator,
        note: measurements.note,
        source: measurements.source,
        uploadId: measurements.uploadId,
        uploadFile: uploads.fileName,
      })
      .from(measurements)
      .innerJoin(characteristics, eq(characteristics.id, measurements.characteristicId))
      .leftJoin(uploads, eq(uploads.id, measurements.uploadId))
      // Naming the lot's characteristics lets the live key, which leads with the characteristic, find them.
      .where(
        and(
          eq(measurements.lotId, lot.id),
          isNull(measurements.voidedAt),
          sql`${measurements.characteristicId} in (select c.id from characteristics c join lots l on l.product_id = c.product_id where l.id = ${lot.id})`,
        ),
      )
      .orderBy(asc(characteristics.id), asc(measurements.replicate));
    // The revision in force when the lot was made judges it, not today's.
    const specRows = await db.execute<{ code: string; revision: number; lsl: number | null; usl: number | null; target: number | null; effective_from: Date }>(sql`
      select distinct on (c.code) c.code, s.revision, s.lsl, s.usl, s.target, s.effective_from
      from spec_limits s join characteristics c on c.id = s.characteristic_id
      where c.product_id = (select product_id from lots where id = ${lot.id}) and s.effective_from <= ${lot.producedAt.toISOString()}::timestamptz
      order by c.code, s.effective_from desc, s.revision desc`);
    const specs = Object.fromEntries(
      specRows.rows.map((s) => [s.code, { revision: s.revision, lsl: s.lsl, usl: s.usl, target: s.target, effectiveFrom: new Date(s.effective_from).toISOString() }]),
    );
    res.json({ ...lot, results, specs });
  });

  return router;
}
