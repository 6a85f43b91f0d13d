import { Router } from 'express';
import type { Database } from '@api/db/client';
import { HttpError, notFound, parseBody } from '@api/http/errors';
import { logger } from '@api/logger';
import { requirePermission, requireSession } from '@api/auth/session';
import type { SpcQueue } from '@api/spc/queue';
import { getRun, listRuns, startRun } from '@api/spc/runs';
import { listRunsQuerySchema, runIdParamsSchema, startRunSchema } from './schema';

/** SPC runs: every role may watch them; quality managers and admins start them. */
export function spcRunsRouter(db: Database, queue: SpcQueue): Router {
  const router = Router();
  router.use(requireSession);

  router.post('/', requirePermission('spc-run.start'), async (req, res) => {
    const body = parseBody(startRunSchema, req.body ?? {});
    let id: number | null;
    try {
      id = await startRun(db, queue, { trigger: 'manual', characteristicIds: body.characteristicIds, requestedBy: req.user!.id });
    } catch (err) {
      logger.error({ err: (err as Error).message }, 'SPC run not started');
      throw new HttpError(503, 'The SPC job queue cannot be reached right now, so the run was not started. Try again in a minute.');
    }
    res.status(202).json({ id });
  });

  router.get('/', async (req, res) => {
    const { limit } = parseBody(listRunsQuerySchema, req.query);
    res.json({ items: await listRuns(db, limit) });
  });

  router.get('/:id', async (req, res) => {
    const { id } = parseBody(runIdParamsSchema, req.params);
    const run = await getRun(db, id);
    if (!run) throw notFound(`SPC run ${id}`);
    res.json(run);
  });

  return router;
}
