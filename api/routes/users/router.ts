import bcrypt from 'bcryptjs';
import { Router } from 'express';
import { asc, eq, sql } from 'drizzle-orm';
import type { PublicUser } from '@shared/schemas/users';
import type { Database } from '@api/db/client';
import { users } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { conflict, HttpError, isUniqueViolation, notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { may } from '@shared/permissions';
import { createUserSchema, updateUserSchema, userIdParamsSchema } from './schema';

const publicColumns = {
  id: users.id,
  email: users.email,
  name: users.name,
  role: users.role,
  active: users.active,
  createdAt: users.createdAt,
};

const toPublic = (u: { id: number; email: string; name: string; role: PublicUser['role']; active: boolean; createdAt: Date }): PublicUser => ({
  ...u,
  createdAt: u.createdAt.toISOString(),
});

/** Administration of sign-ins. Admin only; every change lands in the audit trail. */
export function usersRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession, requirePermission('user.manage'));

  router.get('/', async (_req, res) => {
    const rows = await db.select(publicColumns).from(users).orderBy(asc(users.name));
    res.json({ items: rows.map(toPublic) });
  });

  router.post('/', async (req, res) => {
    const input = parseBody(createUserSchema, req.body);
    const passwordHash = await bcrypt.hash(input.password, 10);
    try {
      const created = await db.transaction(async (tx) => {
        const [row] = await tx.insert(users).values({ email: input.email, name: input.name, role: input.role, passwordHash }).returning(publicColumns);
        await recordAudit(tx, { actorId: req.user!.id, action: 'create', entity: 'user', entityId: row.id, after: { email: row.email, name: row.name, role: row.role } });
        return row;
      });
      res.status(201).json(toPublic(created));
    } catch (err) {
      if (isUniqueViolation(err)) throw conflict(`A user with e-mail ${input.email} already exists`, [{ path: 'email', message: `A user with e-mail ${input.email} already exists` }]);
      throw err;
    }
  });

  router.patch('/:id', async (req, res) => {
    const { id } = parseBody(userIdParamsSchema, req.params);
    const input = parseBody(updateUserSchema, req.body);
    if (id === req.user!.id && (input.active === false || (input.role && !may(input.role, 'user.manage')))) {
      throw new HttpError(400, 'You cannot deactivate yourself or remove your own administrator role');
    }
    const updated = await db.transaction(async (tx) => {
      const [before] = await tx.select(publicColumns).from(users).where(eq(users.id, id)).for('update');
      if (!before) throw notFound('User');
      const changes: Partial<typeof users.$inferInsert> = { updatedAt: sql`now()` as unknown as Date };
      if (input.name !== undefined) changes.name = input.name;
      if (input.role !== undefined) changes.role = input.role;
      if (input.active !== undefined) changes.active = input.active;
      if (input.password !== undefined) changes.passwordHash = await bcrypt.hash(input.password, 10);
      const [after] = await tx.update(users).set(changes).where(eq(users.id, id)).returning(publicColumns);
      await recordAudit(tx, {
        actorId: req.user!.id,
        action: input.password ? 'update (password reset)' : 'update',
        entity: 'user',
        entityId: id,
        before: { name: before.name, role: before.role, active: before.active },
        after: { name: after.name, role: after.role, active: after.active },
      });
      return after;
    });
    res.json(toPublic(updated));
  });

  return router;
}
