import { Router } from 'express';
import { and, eq, sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { alarmSubscriptions, productionLines, products } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { conflict, fieldError, HttpError, isUniqueViolation, notFound, parseBody } from '@api/http/errors';
import { requireSession } from '@api/auth/session';
import { createSubscriptionSchema, subscriptionIdParamsSchema, updateSubscriptionSchema } from './schema';

/** Each signed-in user manages their own e-mail alerts. */
export function subscriptionsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);

  const mine = (userId: number) =>
    db
      .select({
        id: alarmSubscriptions.id,
        lineId: alarmSubscriptions.lineId,
        lineCode: productionLines.code,
        lineName: productionLines.name,
        productId: alarmSubscriptions.productId,
        productCode: products.code,
        productName: products.name,
        immediate: alarmSubscriptions.immediate,
        digest: alarmSubscriptions.digest,
        createdAt: alarmSubscriptions.createdAt,
      })
      .from(alarmSubscriptions)
      .leftJoin(productionLines, eq(productionLines.id, alarmSubscriptions.lineId))
      .leftJoin(products, eq(products.id, alarmSubscriptions.productId))
      .where(eq(alarmSubscriptions.userId, userId))
      .orderBy(sql`${productionLines.code} nulls last, ${products.code}`);

  router.get('/', async (req, res) => {
    res.json({ items: await mine(req.user!.id) });
  });

  router.post('/', async (req, res) => {
    const input = parseBody(createSubscriptionSchema, req.body);
    if (input.lineId !== undefined) {
      const [line] = await db.select({ id: productionLines.id }).from(productionLines).where(eq(productionLines.id, input.lineId));
      if (!line) throw fieldError('lineId', `there is no production line ${input.lineId}`);
    } else {
      const [product] = await db.select({ id: products.id }).from(products).where(eq(products.id, input.productId!));
      if (!product) throw fieldError('productId', `there is no product ${input.productId}`);
    }
    try {
      const row = await db.transaction(async (tx) => {
        const [created] = await tx
          .insert(alarmSubscriptions)
          .values({ userId: req.user!.id, lineId: input.lineId ?? null, productId: input.productId ?? null, immediate: input.immediate, digest: input.digest })
          .returning({ id: alarmSubscriptions.id });
        await recordAudit(tx, { actorId: req.user!.id, action: 'subscribe', entity: 'alarm subscription', entityId: created.id, after: input });
        return created;
      });
      res.status(201).json((await mine(req.user!.id)).find((s) => s.id === row.id));
    } catch (err) {
      if (isUniqueViolation(err)) throw conflict('You already subscribe to this; change the existing subscription instead');
      throw err;
    }
  });

  router.patch('/:id', async (req, res) => {
    const { id } = parseBody(subscriptionIdParamsSchema, req.params);
    const input = parseBody(updateSubscriptionSchema, req.body);
    const [current] = await db.select().from(alarmSubscriptions).where(and(eq(alarmSubscriptions.id, id), eq(alarmSubscriptions.userId, req.user!.id)));
    if (!current) throw notFound('Subscription');
    const next = { immediate: input.immediate ?? current.immediate, digest: input.digest ?? current.digest };
    if (!next.immediate && !next.digest) throw new HttpError(400, 'Keep immediate alerts or the digest, or delete the subscription');
    await db.transaction(async (tx) => {
      await tx.update(alarmSubscriptions).set(next).where(eq(alarmSubscriptions.id, id));
      await recordAudit(tx, { actorId: req.user!.id, action: 'update', entity: 'alarm subscription', entityId: id, before: { immediate: current.immediate, digest: current.digest }, after: next });
    });
    res.json((await mine(req.user!.id)).find((s) => s.id === id));
  });

  router.delete('/:id', async (req, res) => {
    const { id } = parseBody(subscriptionIdParamsSchema, req.params);
    const removed = await db.transaction(async (tx) => {
      const [row] = await tx.delete(alarmSubscriptions).where(and(eq(alarmSubscriptions.id, id), eq(alarmSubscriptions.userId, req.user!.id))).returning();
      if (row) await recordAudit(tx, { actorId: req.user!.id, action: 'unsubscribe', entity: 'alarm subscription', entityId: id, before: { lineId: row.lineId, productId: row.productId, immediate: row.immediate, digest: row.digest } });
      return row;
    });
    if (!removed) throw notFound('Subscription');
    res.status(204).end();
  });

  return router;
}
