import { Router } from 'express';
import { asc, eq } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { columnMappings, users } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { conflict, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { saveMappingSchema } from './schema';

const mappingColumns = {
  id: columnMappings.id,
  name: columnMappings.name,
  mapping: columnMappings.mapping,
  createdAt: columnMappings.createdAt,
  createdByName: users.name,
};

/** Named column mappings of lab exports, saved once and chosen again for the next file of that kind. */
export function columnMappingsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/', async (_req, res) => {
    const rows = await db.select(mappingColumns).from(columnMappings).leftJoin(users, eq(users.id, columnMappings.createdBy)).orderBy(asc(columnMappings.name));
    res.json({ items: rows });
  });

  router.post('/', requirePermission('column-mapping.create'), async (req, res) => {
    const input = parseBody(saveMappingSchema, req.body);
    const saved = await db.transaction(async (tx) => {
      const [row] = await tx
        .insert(columnMappings)
        .values({ name: input.name, mapping: input.mapping, createdBy: req.user!.id })
        .onConflictDoNothing({ target: columnMappings.name })
        .returning();
      if (!row) throw conflict(`A mapping named "${input.name}" already exists; choose another name`);
      await recordAudit(tx, { actorId: req.user!.id, action: 'create', entity: 'column mapping', entityId: row.id, after: { name: row.name, mapping: row.mapping } });
      return row;
    });
    res.status(201).json({ id: saved.id, name: saved.name, mapping: saved.mapping, createdAt: saved.createdAt, createdByName: req.user!.name });
  });

  return router;
}
