import { Router } from 'express';
import { asc, eq } from 'drizzle-orm';
import type { Person } from '@shared/schemas/users';
import type { Database } from '@api/db/client';
import { users } from '@api/db/schema';
import { requirePermission, requireSession } from '@api/auth/session';

/**
 * The active users by name and role, for the assignee and owner pick lists: every signed-in role reads
 * it; e-mail addresses and the rest of a user's record stay with the administrator's user list.
 */
export function peopleRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', requirePermission('plant.read'), async (_req, res) => {
    const rows = await db.select({ id: users.id, name: users.name, role: users.role }).from(users).where(eq(users.active, true)).orderBy(asc(users.name));
    res.json({ items: rows satisfies Person[] });
  });

  return router;
}
