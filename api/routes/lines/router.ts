import { Router } from 'express';
import { eq } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { lots, productionLines } from '@api/db/schema';
import { listLines } from '@api/db/queries/catalogue';
import { recordAudit } from '@api/db/audit';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { auditAction, claimingCode, fieldConflict, neverDeleted, plantId, refuseTakenCode } from '@api/routes/catalogue-writes';
import { createLineSchema, lineParamsSchema, updateLineSchema } from './schema';

/**
 * The plant's production lines.
 * Every signed-in role reads them; the administrator adds and changes them ('catalogue.manage'). They
 * are never deleted but deactivated, and a code that records were made under stays as it is.
 */
export function linesRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);
  const admin = requirePermission('catalogue.manage');

  router.get('/', async (_req, res) => {
    res.json({ items: await listLines(db) });
  });

  router.post('/', admin, async (req, res) => {
    const input = parseBody(createLineSchema, req.body);
    const id = await claimingCode(db, 'Line', input.code, async (tx) => {
      await refuseTakenCode(tx, 'Line', input.code);
      const [row] = await tx.insert(productionLines).values({ plantId: await plantId(tx), code: input.code, name: input.name }).returning({ id: productionLines.id });
      await recordAudit(tx, { actorId: req.user!.id, action: 'create', entity: 'production line', entityId: row.id, after: input });
      return row.id;
    });
    const [line] = await listLines(db, id);
    res.status(201).json(line);
  });

  router.patch('/:id', admin, async (req, res) => {
    const { id } = parseBody(lineParamsSchema, req.params);
    const input = parseBody(updateLineSchema, req.body);
    await claimingCode(db, 'Line', input.code, async (tx) => {
      const [before] = await tx
        .select({ code: productionLines.code, name: productionLines.name, active: productionLines.active })
        .from(productionLines)
        .where(eq(productionLines.id, id))
        .for('update');
      if (!before) throw notFound('Production line');
      const changes: Partial<typeof productionLines.$inferInsert> = {};
      if (input.code !== undefined && input.code !== before.code) {
        const [made] = await tx.select({ id: lots.id }).from(lots).where(eq(lots.lineId, id)).limit(1);
        if (made) throw fieldConflict('code', `Lots were made on line ${before.code}, and they are recorded under that code: it stays as it is. Change the name instead`);
        await refuseTakenCode(tx, 'Line', input.code);
        changes.code = input.code;
      }
      if (input.name !== undefined && input.name !== before.name) changes.name = input.name;
      if (input.active !== undefined && input.active !== before.active) changes.active = input.active;
      if (Object.keys(changes).length === 0) return;
      await tx.update(productionLines).set(changes).where(eq(productionLines.id, id));
      await recordAudit(tx, { actorId: req.user!.id, action: auditAction(changes, changes.active), entity: 'production line', entityId: id, before, after: { ...before, ...changes } });
    });
    const [line] = await listLines(db, id);
    res.json(line);
  });

  router.delete('/:id', admin, neverDeleted('Production lines', 'Deactivate the line instead: uploads then refuse new results on it.'));

  return router;
}
