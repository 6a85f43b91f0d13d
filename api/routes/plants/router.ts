import { Router } from 'express';
import { asc } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { plants } from '@api/db/schema';
import { requireSession } from '@api/auth/session';

/** The plants the product is configured with: every signed-in role reads them. */
export function plantsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', async (_req, res) => {
    res.json({ items: await db.select().from(plants).orderBy(asc(plants.id)) });
  });

  return router;
}
