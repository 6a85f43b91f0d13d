import { Router } from 'express';
import { sql } from 'drizzle-orm';
import type { Database } from '@api/db/client';

/** GET /api/health: 200 while the database answers, 503 with the reason as `error` when it does not. */
export function healthRouter(db: Database): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    try {
      await Promise.race([
        db.execute(sql`select 1`),
        new Promise((_, reject) => setTimeout(() => reject(new Error('database did not answer within 2 s')), 2000)),
      ]);
      res.json({ status: 'ok' });
    } catch (err) {
      res.status(503).json({ error: `Database unavailable: ${(err as Error).message}`, status: 'unavailable' });
    }
  });
  return router;
}
