import { Router } from 'express';
import { and, asc, desc, eq, gte, lt } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { plants, processEvents, productionLines, products, users } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { badRequest, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { listProcessEventsQuerySchema, processEventSchema } from './schema';

/** Plant events that explain charts: "New sand source", "Press recalibrated". */
export function processEventsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', async (req, res) => {
    const q = parseBody(listProcessEventsQuerySchema, req.query);
    const rows = await db
      .select({
        id: processEvents.id,
        occurredAt: processEvents.occurredAt,
        title: processEvents.title,
        description: processEvents.description,
        lineCode: productionLines.code,
        productCode: products.code,
        createdBy: users.name,
      })
      .from(processEvents)
      .leftJoin(productionLines, eq(productionLines.id, processEvents.lineId))
      .leftJoin(products, eq(products.id, processEvents.productId))
      .leftJoin(users, eq(users.id, processEvents.createdBy))
      .where(and(q.from ? gte(processEvents.occurredAt, new Date(q.from)) : undefined, q.to ? lt(processEvents.occurredAt, new Date(q.to)) : undefined))
      .orderBy(desc(processEvents.occurredAt));
    res.json({ items: rows });
  });

  router.post('/', requirePermission('process-event.create'), async (req, res) => {
    const input = parseBody(processEventSchema, req.body);
    const created = await db.transaction(async (tx) => {
      const [plant] = await tx.select({ id: plants.id }).from(plants).orderBy(asc(plants.id)).limit(1);
      if (!plant) throw badRequest('No plant is configured yet');
      let lineId: number | null = null;
      let productId: number | null = null;
      if (input.lineCode) {
        const [line] = await tx.select({ id: productionLines.id }).from(productionLines).where(eq(productionLines.code, input.lineCode));
        if (!line) throw badRequest(`lineCode: unknown production line "${input.lineCode}"`, [{ path: 'lineCode', message: `Unknown production line "${input.lineCode}"` }]);
        lineId = line.id;
      }
      if (input.productCode) {
        const [product] = await tx.select({ id: products.id, lineId: products.lineId }).from(products).where(eq(products.code, input.productCode));
        if (!product) throw badRequest(`productCode: unknown product "${input.productCode}"`, [{ path: 'productCode', message: `Unknown product "${input.productCode}"` }]);
        productId = product.id;
        lineId ??= product.lineId;
      }
      const [row] = await tx
        .insert(processEvents)
        .values({ plantId: plant.id, lineId, productId, occurredAt: new Date(input.occurredAt), title: input.title, description: input.description ?? null, createdBy: req.user!.id })
        .returning();
      await recordAudit(tx, { actorId: req.user!.id, action: 'record event', entity: 'process event', entityId: row.id, after: { title: row.title, occurredAt: row.occurredAt, lineCode: input.lineCode ?? null, productCode: input.productCode ?? null } });
      return row;
    });
    res.status(201).json(created);
  });

  return router;
}
