import { Router } from 'express';
import { requirePermission, requireSession } from '@api/auth/session';
import type { FakeSmtp } from '@api/mail/fake-smtp';

/** Mounted only while the local fake SMTP server is in use: what it has received, newest first. */
export function devRouter(fake: FakeSmtp): Router {
  const router = Router();
  router.use(requireSession, requirePermission('outbox.read'));
  router.get('/outbox', (_req, res) => {
    res.json({ items: fake.messages().reverse() });
  });
  return router;
}
