import { Router } from 'express';
import { asc, eq } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { plants } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import type { PlantView } from '@shared/schemas/catalogue';
import { plantParamsSchema, updatePlantSchema } from './schema';

/** The plants the product is configured with: every signed-in role reads them, an administrator sets their date format. */
export function plantsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', async (_req, res) => {
    res.json({ items: (await db.select().from(plants).orderBy(asc(plants.id))) satisfies PlantView[] });
  });

  router.patch('/:id', requirePermission('plant.manage'), async (req, res) => {
    const { id } = parseBody(plantParamsSchema, req.params);
    const input = parseBody(updatePlantSchema, req.body);
    const plant = await db.transaction(async (tx) => {
      const [before] = await tx.select().from(plants).where(eq(plants.id, id)).for('update');
      if (!before) throw notFound('Plant');
      if (before.dateFormat === input.dateFormat) return before;
      const [after] = await tx.update(plants).set({ dateFormat: input.dateFormat }).where(eq(plants.id, id)).returning();
      await recordAudit(tx, { actorId: req.user!.id, action: 'update', entity: 'plant', entityId: id, before: { dateFormat: before.dateFormat }, after: { dateFormat: after.dateFormat } });
      return after;
    });
    res.json(plant satisfies PlantView);
  });

  return router;
}
