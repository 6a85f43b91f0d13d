import { Router } from 'express';
import { eq } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { lots, productionLines, products } from '@api/db/schema';
import { listProducts } from '@api/db/queries/catalogue';
import { recordAudit } from '@api/db/audit';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { auditAction, claimingCode, fieldConflict, lineIdFor, neverDeleted, plantId, refuseTakenCode } from '@api/routes/catalogue-writes';
import { createProductSchema, productParamsSchema, updateProductSchema } from './schema';

/**
 * The plant's products, each made on one line.
 * Every signed-in role reads them; the administrator adds and changes them ('catalogue.manage'). They
 * are never deleted but deactivated, and a code that records were made under stays as it is.
 */
export function productsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession);
  const admin = requirePermission('catalogue.manage');

  router.get('/', async (_req, res) => {
    res.json({ items: await listProducts(db) });
  });

  router.post('/', admin, async (req, res) => {
    const input = parseBody(createProductSchema, req.body);
    const id = await claimingCode(db, 'Product', input.code, async (tx) => {
      await refuseTakenCode(tx, 'Product', input.code);
      const lineId = await lineIdFor(tx, input.lineCode);
      const [row] = await tx
        .insert(products)
        .values({ plantId: await plantId(tx), code: input.code, name: input.name, family: input.family, declaredClass: input.declaredClass, lineId })
        .returning({ id: products.id });
      await recordAudit(tx, { actorId: req.user!.id, action: 'create', entity: 'product', entityId: row.id, after: { ...input, active: true } });
      return row.id;
    });
    const [product] = await listProducts(db, id);
    res.status(201).json(product);
  });

  router.patch('/:id', admin, async (req, res) => {
    const { id } = parseBody(productParamsSchema, req.params);
    const input = parseBody(updateProductSchema, req.body);
    await claimingCode(db, 'Product', input.code, async (tx) => {
      const [row] = await tx.select().from(products).where(eq(products.id, id)).for('update');
      if (!row) throw notFound('Product');
      const [line] = row.lineId === null ? [] : await tx.select({ code: productionLines.code }).from(productionLines).where(eq(productionLines.id, row.lineId));
      const before = { code: row.code, name: row.name, family: row.family, declaredClass: row.declaredClass, lineCode: line?.code ?? null, active: row.active };
      const changes: Partial<typeof products.$inferInsert> = {};
      const after = { ...before };
      if (input.code !== undefined && input.code !== before.code) {
        const [made] = await tx.select({ id: lots.id }).from(lots).where(eq(lots.productId, id)).limit(1);
        if (made) throw fieldConflict('code', `Lots of ${before.code} are recorded under that code: it stays as it is. Add a new product if the code must change`);
        await refuseTakenCode(tx, 'Product', input.code);
        changes.code = after.code = input.code;
      }
      if (input.lineCode !== undefined && input.lineCode !== before.lineCode) {
        changes.lineId = await lineIdFor(tx, input.lineCode);
        after.lineCode = input.lineCode;
      }
      for (const key of ['name', 'family', 'declaredClass', 'active'] as const) {
        if (input[key] === undefined || input[key] === before[key]) continue;
        Object.assign(changes, { [key]: input[key] });
        Object.assign(after, { [key]: input[key] });
      }
      if (Object.keys(changes).length === 0) return;
      await tx.update(products).set(changes).where(eq(products.id, id));
      await recordAudit(tx, { actorId: req.user!.id, action: auditAction(changes, changes.active), entity: 'product', entityId: id, before, after });
    });
    const [product] = await listProducts(db, id);
    res.json(product);
  });

  router.delete('/:id', admin, neverDeleted('Products', 'Deactivate the product instead: uploads and the SPC run then leave it out.'));

  return router;
}
