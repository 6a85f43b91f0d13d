import { Router } from 'express';
import { asc, eq } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { plants } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import type { PlantView } from '@shared/schemas/catalogue';
import { plantParamsSchema, updatePlantSchema } from './schema';

/** The plants the product is configured with: every signed-in role reads them, an administrator sets their date format and capability threshold. */
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
      const changes = Object.fromEntries(Object.entries(input).filter(([key, value]) => value !== undefined && value !== before[key as keyof typeof input]));
      if (!Object.keys(changes).length) return before;
      const [after] = await tx.update(plants).set(changes).where(eq(plants.id, id)).returning();
      const pick = (row: typeof before) => Object.fromEntries(Object.keys(changes).map((key) => [key, row[key as keyof typeof input]]));
      await recordAudit(tx, { actorId: req.user!.id, action: 'update', entity: 'plant', entityId: id, before: pick(before), after: pick(after) });
      return after;
    });
    res.json(plant satisfies PlantView);
  });

  return router;
}
