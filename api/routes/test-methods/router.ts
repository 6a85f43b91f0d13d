import { Router } from 'express';
import { methodCautions, testMethods as methodCatalogue } from '@shared/lab';
import { requireSession } from '@api/auth/session';

/** The test-method catalogue of shared/lab with each method's cautions: every signed-in role reads it. */
export function testMethodsRouter(): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', (_req, res) => {
    res.json({ items: methodCatalogue.map((m) => ({ ...m, cautions: methodCautions(m.code) })) });
  });

  return router;
}
