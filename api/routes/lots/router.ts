import { Router } from 'express';
import { and, asc, desc, eq, ilike, isNull, sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { characteristics, lotHolds, lots, measurements, ncrLots, ncrs, productionLines, products, uploads } from '@api/db/schema';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import type { Json } from '@api/http/json';
import { holdsOfLot, lotStatusSql, placeHold, releaseHold } from '@api/lots/holds';
import { queueLotHoldMail } from '@api/mail/lot-mail';
import type { Executor } from '@api/spc/db';
import { lotHoldRequestSchema, type LotList, type LotView } from '@shared/schemas/lots';
import { listLotsQuerySchema, lotParamsSchema } from './schema';

/** The lot's standing, from the one rule (api/lots/holds.ts). */
const statusOf = lotStatusSql(sql`${lots.id}`);

/** The lot page's answer: the lot, its live results, the specification revisions that judge it, its standing, holds and NCRs. */
async function lotView(db: Executor, lotNumber: string): Promise<Json<LotView>> {
  const [lot] = await db
    .select({
      id: lots.id,
      lotNumber: lots.lotNumber,
      producedAt: lots.producedAt,
      shift: lots.shift,
      productCode: products.code,
      productName: products.name,
      lineCode: productionLines.code,
      status: statusOf,
    })
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
  const lotNcrs = await db
    .select({ id: ncrs.id, number: ncrs.number, title: ncrs.title, status: ncrs.status, disposition: ncrLots.disposition })
    .from(ncrLots)
    .innerJoin(ncrs, eq(ncrs.id, ncrLots.ncrId))
    .where(eq(ncrLots.lotId, lot.id))
    .orderBy(desc(ncrs.id));
  return { ...lot, results, specs, holds: await holdsOfLot(db, lot.id), ncrs: lotNcrs };
}

/** The lot of a hold or release request; 404 when there is none. The open-hold index and releaseHold's update settle a race. */
async function lotToDecide(tx: Executor, lotNumber: string): Promise<{ id: number; lotNumber: string }> {
  const res = await tx.execute<{ id: number; lot_number: string }>(sql`select id, lot_number from lots where lot_number = ${lotNumber}`);
  const lot = res.rows[0];
  if (!lot) throw notFound(`Lot ${lotNumber}`);
  return { id: lot.id, lotNumber: lot.lot_number };
}

/**
 * Lots as produced, and one lot with its live results, standing, holds and NCRs: every signed-in role reads
 * them. Lab staff put a lot on hold; only a quality manager releases it. Each decision is an audit event and
 * an e-mail to the subscribers of the lot's line or product, in one transaction.
 */
export function lotsRouter(db: Database, publicUrl: string): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', requirePermission('plant.read'), async (req, res) => {
    const q = parseBody(listLotsQuerySchema, req.query);
    const rows = await db
      .select({
        id: lots.id,
        lotNumber: lots.lotNumber,
        producedAt: lots.producedAt,
        shift: lots.shift,
        productCode: products.code,
        lineCode: productionLines.code,
        status: statusOf,
        holdReason: lotHolds.reason,
        heldSince: lotHolds.placedAt,
      })
      .from(lots)
      .innerJoin(products, eq(products.id, lots.productId))
      .innerJoin(productionLines, eq(productionLines.id, lots.lineId))
      // At most one open hold a lot (lot_holds_open_key).
      .leftJoin(lotHolds, and(eq(lotHolds.lotId, lots.id), isNull(lotHolds.releasedAt)))
      .where(
        and(
          q.product ? eq(products.code, q.product) : undefined,
          q.q ? ilike(lots.lotNumber, `${q.q.replace(/[%_\\]/g, '\\$&')}%`) : undefined,
          q.status ? sql`${statusOf} = ${q.status}` : undefined,
        ),
      )
      // A lot number typed in full comes before the lots whose number merely starts with it.
      .orderBy(...(q.q ? [desc(sql`lower(${lots.lotNumber}) = lower(${q.q})`)] : []), desc(lots.producedAt), desc(lots.id))
      .limit(q.limit + 1)
      .offset(q.offset);
    const body = { items: rows.slice(0, q.limit), more: rows.length > q.limit };
    res.json(body satisfies Json<LotList>);
  });

  router.get('/:lotNumber', async (req, res) => {
    const { lotNumber } = parseBody(lotParamsSchema, req.params);
    res.json(await lotView(db, lotNumber));
  });

  router.post('/:lotNumber/hold', requirePermission('lot.hold'), async (req, res) => {
    const { lotNumber } = parseBody(lotParamsSchema, req.params);
    const { reason } = parseBody(lotHoldRequestSchema, req.body ?? {});
    const view = await db.transaction(async (tx) => {
      const lot = await lotToDecide(tx, lotNumber);
      const holdId = await placeHold(tx, { lotId: lot.id, lotNumber: lot.lotNumber, source: 'manual', reason, actorId: req.user!.id }, { refuseIfHeld: true });
      await queueLotHoldMail(tx, 'lot-hold', holdId!, publicUrl);
      return lotView(tx, lot.lotNumber);
    });
    res.json(view);
  });

  router.post('/:lotNumber/release', requirePermission('lot.release'), async (req, res) => {
    const { lotNumber } = parseBody(lotParamsSchema, req.params);
    const { reason } = parseBody(lotHoldRequestSchema, req.body ?? {});
    const view = await db.transaction(async (tx) => {
      const lot = await lotToDecide(tx, lotNumber);
      const holdId = await releaseHold(tx, { lotId: lot.id, lotNumber: lot.lotNumber, reason, actorId: req.user!.id });
      await queueLotHoldMail(tx, 'lot-release', holdId, publicUrl);
      return lotView(tx, lot.lotNumber);
    });
    res.json(view);
  });

  return router;
}
