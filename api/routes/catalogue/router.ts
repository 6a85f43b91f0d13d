import { Router } from 'express';
import { and, asc, desc, eq, ilike, isNull, sql } from 'drizzle-orm';
import { methodCautions, testMethods as methodCatalogue } from '../../../shared/lab';
import type { Database } from '../../db/client';
import { characteristics, lots, measurements, plants, productionLines, products, uploads } from '../../db/schema';
import { listCharacteristics, listProducts } from '../../db/queries/catalogue';
import { notFound, parseBody } from '../../http/errors';
import { requireSession } from '../../auth/session';
import { listLotsQuerySchema, lotParamsSchema } from './schema';

/** What the plant is configured with, readable by every signed-in role. */
export function catalogueRouter(db: Database): Router {
  const router = Router();

  router.get('/plants', requireSession, async (_req, res) => {
    res.json({ items: await db.select().from(plants).orderBy(asc(plants.id)) });
  });

  router.get('/lines', requireSession, async (_req, res) => {
    res.json({ items: await db.select({ id: productionLines.id, code: productionLines.code, name: productionLines.name }).from(productionLines).orderBy(asc(productionLines.code)) });
  });

  router.get('/products', requireSession, async (_req, res) => {
    res.json({ items: await listProducts(db) });
  });

  router.get('/characteristics', requireSession, async (_req, res) => {
    res.json({ items: await listCharacteristics(db) });
  });

  router.get('/test-methods', requireSession, (_req, res) => {
    res.json({ items: methodCatalogue.map((m) => ({ ...m, cautions: methodCautions(m.code) })) });
  });

  router.get('/lots', requireSession, async (req, res) => {
    const q = parseBody(listLotsQuerySchema, req.query);
    const rows = await db
      .select({ id: lots.id, lotNumber: lots.lotNumber, producedAt: lots.producedAt, shift: lots.shift, productCode: products.code, lineCode: productionLines.code })
      .from(lots)
      .innerJoin(products, eq(products.id, lots.productId))
      .innerJoin(productionLines, eq(productionLines.id, lots.lineId))
      .where(and(q.product ? eq(products.code, q.product) : undefined, q.q ? ilike(lots.lotNumber, `${q.q.replace(/[%_\\]/g, '\\$&')}%`) : undefined))
      .orderBy(desc(lots.producedAt))
      .limit(q.limit);
    res.json({ items: rows });
  });

  router.get('/lots/:lotNumber', requireSession, async (req, res) => {
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
      .where(and(eq(measurements.lotId, lot.id), isNull(measurements.voidedAt)))
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
