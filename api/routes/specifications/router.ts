import { Router } from 'express';
import { desc, eq } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { characteristics, plants, products, specLimits, users } from '@api/db/schema';
import { formatPlantDateTime } from '@shared/time';
import { recordAudit } from '@api/db/audit';
import { badRequest, notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { characteristicIdParamsSchema, specRevisionSchema } from './schema';

/** Specification revisions per characteristic: the revision in force at a lot's production time judges it. */
export function specificationsRouter(db: Database): Router {
  const router = Router();

  router.get('/:id/spec-revisions', requireSession, async (req, res) => {
    const { id } = parseBody(characteristicIdParamsSchema, req.params);
    const rows = await db
      .select({
        id: specLimits.id,
        revision: specLimits.revision,
        lsl: specLimits.lsl,
        usl: specLimits.usl,
        target: specLimits.target,
        effectiveFrom: specLimits.effectiveFrom,
        reason: specLimits.reason,
        createdAt: specLimits.createdAt,
        createdBy: users.name,
      })
      .from(specLimits)
      .leftJoin(users, eq(users.id, specLimits.createdBy))
      .where(eq(specLimits.characteristicId, id))
      .orderBy(desc(specLimits.revision));
    res.json({ items: rows });
  });

  router.post('/:id/spec-revisions', requireSession, requirePermission('specification.revise'), async (req, res) => {
    const { id } = parseBody(characteristicIdParamsSchema, req.params);
    const input = parseBody(specRevisionSchema, req.body);
    const created = await db.transaction(async (tx) => {
      const [ch] = await tx
        .select({ id: characteristics.id, timeZone: plants.timeZone, dateFormat: plants.dateFormat })
        .from(characteristics)
        .innerJoin(products, eq(products.id, characteristics.productId))
        .innerJoin(plants, eq(plants.id, products.plantId))
        .where(eq(characteristics.id, id))
        .for('update', { of: characteristics });
      if (!ch) throw notFound('Characteristic');
      const [latest] = await tx.select({ revision: specLimits.revision, effectiveFrom: specLimits.effectiveFrom }).from(specLimits).where(eq(specLimits.characteristicId, id)).orderBy(desc(specLimits.revision)).limit(1);
      const effectiveFrom = input.effectiveFrom ? new Date(input.effectiveFrom) : new Date();
      // Revisions follow each other in time, so "the revision in force at a lot's production time" has one answer.
      if (latest && effectiveFrom < latest.effectiveFrom) {
        const message = `A new revision cannot take effect before revision ${latest.revision}, in force from ${formatPlantDateTime(latest.effectiveFrom, ch)}`;
        throw badRequest(`effectiveFrom: ${message}`, [{ path: 'effectiveFrom', message }]);
      }
      const next = (latest?.revision ?? 0) + 1;
      const [row] = await tx
        .insert(specLimits)
        .values({
          characteristicId: id,
          revision: next,
          lsl: input.lsl ?? null,
          usl: input.usl ?? null,
          target: input.target ?? null,
          effectiveFrom,
          reason: input.reason,
          createdBy: req.user!.id,
        })
        .returning();
      await recordAudit(tx, { actorId: req.user!.id, action: 'revise specification', entity: 'characteristic', entityId: id, after: { revision: row.revision, lsl: row.lsl, usl: row.usl, target: row.target, effectiveFrom: row.effectiveFrom }, reason: input.reason });
      return row;
    });
    res.status(201).json(created);
  });

  return router;
}
