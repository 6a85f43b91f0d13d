import { Router, type RequestHandler } from 'express';
import { and, asc, desc, eq, ilike, isNull, max, sql } from 'drizzle-orm';
import { methodCautions, testMethods as methodCatalogue } from '@shared/lab';
import { characteristicIssues } from '@shared/schemas/catalogue';
import type { Database } from '@api/db/client';
import { characteristics, lots, measurements, plants, productionLines, products, specLimits, testMethods, uploads } from '@api/db/schema';
import { hasRecordedResults, listCharacteristics, listLines, listProducts } from '@api/db/queries/catalogue';
import { recordAudit } from '@api/db/audit';
import { badRequest, conflict, HttpError, isUniqueViolation, notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import {
  catalogueIdParamsSchema,
  createCharacteristicSchema,
  createLineSchema,
  createProductSchema,
  listLotsQuerySchema,
  lotParamsSchema,
  updateCharacteristicSchema,
  updateLineSchema,
  updateProductSchema,
} from './schema';

type Tx = Parameters<Parameters<Database['transaction']>[0]>[0];

/** A refusal that concerns one field of the request, so a form can show it under that field. */
const fieldError = (path: string, message: string) => badRequest(`${path}: ${message}`, [{ path, message }]);
const fieldConflict = (path: string, message: string) => new HttpError(409, message, [{ path, message }]);

/** A second writer may take the code between our check and the insert: the unique index has the last word. */
async function claimingCode<T>(taken: string, write: () => Promise<T>): Promise<T> {
  try {
    return await write();
  } catch (err) {
    if (isUniqueViolation(err)) throw fieldConflict('code', taken);
    throw err;
  }
}

async function plantId(tx: Tx): Promise<number> {
  const [plant] = await tx.select({ id: plants.id }).from(plants).orderBy(asc(plants.id)).limit(1);
  if (!plant) throw badRequest('No plant is configured yet');
  return plant.id;
}

async function lineIdFor(tx: Tx, code: string): Promise<number> {
  const [line] = await tx.select({ id: productionLines.id }).from(productionLines).where(eq(productionLines.code, code));
  if (!line) throw fieldError('lineCode', `There is no production line ${code}`);
  return line.id;
}

async function productIdFor(tx: Tx, code: string): Promise<number> {
  const [product] = await tx.select({ id: products.id }).from(products).where(eq(products.code, code));
  if (!product) throw fieldError('productCode', `There is no product ${code}`);
  return product.id;
}

async function methodFor(tx: Tx, code: string): Promise<{ id: number; unit: string }> {
  const [method] = await tx.select({ id: testMethods.id, unit: testMethods.unit }).from(testMethods).where(eq(testMethods.code, code));
  if (!method) throw fieldError('testMethodCode', `Test method ${code} is not in the catalogue`);
  return method;
}

/** The owner of a code, named in the refusal: "Line code L1 is already used by Line 1 · levelling compounds". */
async function refuseTakenCode(tx: Tx, kind: 'Line' | 'Product' | 'Characteristic', code: string): Promise<void> {
  const table = { Line: productionLines, Product: products, Characteristic: characteristics }[kind];
  const [other] = await tx.select({ name: table.name }).from(table).where(eq(table.code, code));
  if (other) throw fieldConflict('code', `${kind} code ${code} is already used by ${other.name}`);
}

const auditAction = (changes: object, active: boolean | undefined) =>
  Object.keys(changes).length === 1 && active !== undefined ? (active ? 'reactivate' : 'deactivate') : 'update';

/** Records are never deleted: a DELETE is answered with what to do instead. */
const neverDeleted =
  (what: string, instead: string): RequestHandler =>
  (_req, res) => {
    res.set('Allow', 'PATCH');
    throw new HttpError(405, `${what} are never deleted, so that the records made with them stay whole. ${instead}`);
  };

/**
 * What the plant is configured with: every signed-in role reads it, the administrator sets it up.
 * Lines, products and characteristics are never deleted but deactivated, and codes that records were made under stay as they are.
 */
/** Called after a characteristic's chart type, subgroup size or run-rule set changed; its chart and alarms follow in an incremental run. */
export type ChartSettingsChanged = (characteristicId: number, userId: number) => Promise<void>;

/** The settings the SPC run computes a chart from. */
const chartSettings = new Set(['chartType', 'subgroupSize', 'ruleSet']);

export function catalogueRouter(db: Database, chartSettingsChanged: ChartSettingsChanged): Router {
  const router = Router();
  const admin = requirePermission('catalogue.manage');

  router.get('/plants', requireSession, async (_req, res) => {
    res.json({ items: await db.select().from(plants).orderBy(asc(plants.id)) });
  });

  router.get('/lines', requireSession, async (_req, res) => {
    res.json({ items: await listLines(db) });
  });

  router.get('/products', requireSession, async (_req, res) => {
    res.json({ items: await listProducts(db) });
  });

  router.get('/characteristics', requireSession, async (_req, res) => {
    res.json({ items: await listCharacteristics(db) });
  });

  router.get('/test-methods', requireSession, (_req, res) => {
    res.json({ items: methodCatalogue.map((m) => ({ ...m, cautions: methodCautions(m.code) })) });
  });

  router.post('/lines', requireSession, admin, async (req, res) => {
    const input = parseBody(createLineSchema, req.body);
    const id = await claimingCode(`Line code ${input.code} is already in use`, () =>
      db.transaction(async (tx) => {
        await refuseTakenCode(tx, 'Line', input.code);
        const [row] = await tx.insert(productionLines).values({ plantId: await plantId(tx), code: input.code, name: input.name }).returning({ id: productionLines.id });
        await recordAudit(tx, { actorId: req.user!.id, action: 'create', entity: 'production line', entityId: row.id, after: input });
        return row.id;
      }),
    );
    const [line] = await listLines(db, id);
    res.status(201).json(line);
  });

  router.patch('/lines/:id', requireSession, admin, async (req, res) => {
    const { id } = parseBody(catalogueIdParamsSchema, req.params);
    const input = parseBody(updateLineSchema, req.body);
    await claimingCode(`Line code ${input.code} is already in use`, () =>
      db.transaction(async (tx) => {
        const [before] = await tx
          .select({ code: productionLines.code, name: productionLines.name, active: productionLines.active })
          .from(productionLines)
          .where(eq(productionLines.id, id))
          .for('update');
        if (!before) throw notFound('Production line');
        const changes: Partial<typeof productionLines.$inferInsert> = {};
        if (input.code !== undefined && input.code !== before.code) {
          const [made] = await tx.select({ id: lots.id }).from(lots).where(eq(lots.lineId, id)).limit(1);
          if (made) throw fieldConflict('code', `Lots were made on line ${before.code}, and they are recorded under that code: it stays as it is. Change the name instead`);
          await refuseTakenCode(tx, 'Line', input.code);
          changes.code = input.code;
        }
        if (input.name !== undefined && input.name !== before.name) changes.name = input.name;
        if (input.active !== undefined && input.active !== before.active) changes.active = input.active;
        if (Object.keys(changes).length === 0) return;
        await tx.update(productionLines).set(changes).where(eq(productionLines.id, id));
        await recordAudit(tx, { actorId: req.user!.id, action: auditAction(changes, changes.active), entity: 'production line', entityId: id, before, after: { ...before, ...changes } });
      }),
    );
    const [line] = await listLines(db, id);
    res.json(line);
  });

  router.delete('/lines/:id', requireSession, admin, neverDeleted('Production lines', 'Deactivate the line instead: uploads then refuse new results on it.'));

  router.post('/products', requireSession, admin, async (req, res) => {
    const input = parseBody(createProductSchema, req.body);
    const id = await claimingCode(`Product code ${input.code} is already in use`, () =>
      db.transaction(async (tx) => {
        await refuseTakenCode(tx, 'Product', input.code);
        const lineId = await lineIdFor(tx, input.lineCode);
        const [row] = await tx
          .insert(products)
          .values({ plantId: await plantId(tx), code: input.code, name: input.name, family: input.family, declaredClass: input.declaredClass, lineId })
          .returning({ id: products.id });
        await recordAudit(tx, { actorId: req.user!.id, action: 'create', entity: 'product', entityId: row.id, after: { ...input, active: true } });
        return row.id;
      }),
    );
    const [product] = await listProducts(db, id);
    res.status(201).json(product);
  });

  router.patch('/products/:id', requireSession, admin, async (req, res) => {
    const { id } = parseBody(catalogueIdParamsSchema, req.params);
    const input = parseBody(updateProductSchema, req.body);
    await claimingCode(`Product code ${input.code} is already in use`, () =>
      db.transaction(async (tx) => {
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
      }),
    );
    const [product] = await listProducts(db, id);
    res.json(product);
  });

  router.delete('/products/:id', requireSession, admin, neverDeleted('Products', 'Deactivate the product instead: uploads and the SPC run then leave it out.'));

  router.post('/characteristics', requireSession, admin, async (req, res) => {
    const input = parseBody(createCharacteristicSchema, req.body);
    const id = await claimingCode(`Characteristic code ${input.code} is already in use`, () =>
      db.transaction(async (tx) => {
        await refuseTakenCode(tx, 'Characteristic', input.code);
        const productId = await productIdFor(tx, input.productCode);
        const method = await methodFor(tx, input.testMethodCode);
        const { spec, ...settings } = input;
        const [row] = await tx
          .insert(characteristics)
          .values({
            code: input.code,
            name: input.name,
            productId,
            testMethodId: method.id,
            ageDays: input.ageDays,
            unit: method.unit,
            subgroupSize: input.subgroupSize,
            chartType: input.chartType,
            ruleSet: input.ruleSet,
            samplingPlan: input.samplingPlan,
          })
          .returning({ id: characteristics.id });
        await recordAudit(tx, { actorId: req.user!.id, action: 'create', entity: 'characteristic', entityId: row.id, after: { ...settings, unit: method.unit, active: true } });
        if (spec) {
          const [revision] = await tx
            .insert(specLimits)
            .values({
              characteristicId: row.id,
              revision: 1,
              lsl: spec.lsl ?? null,
              usl: spec.usl ?? null,
              target: spec.target ?? null,
              effectiveFrom: spec.effectiveFrom ? new Date(spec.effectiveFrom) : new Date(),
              reason: spec.reason,
              createdBy: req.user!.id,
            })
            .returning();
          await recordAudit(tx, {
            actorId: req.user!.id,
            action: 'revise specification',
            entity: 'characteristic',
            entityId: row.id,
            after: { revision: 1, lsl: revision.lsl, usl: revision.usl, target: revision.target, effectiveFrom: revision.effectiveFrom },
            reason: spec.reason,
          });
        }
        return row.id;
      }),
    );
    const [characteristic] = await listCharacteristics(db, id);
    res.status(201).json(characteristic);
  });

  router.patch('/characteristics/:id', requireSession, admin, async (req, res) => {
    const { id } = parseBody(catalogueIdParamsSchema, req.params);
    const input = parseBody(updateCharacteristicSchema, req.body);
    const settingsChanged = await claimingCode(`Characteristic code ${input.code} is already in use`, () =>
      db.transaction(async (tx) => {
        const [row] = await tx.select().from(characteristics).where(eq(characteristics.id, id)).for('update');
        if (!row) throw notFound('Characteristic');
        const [{ productCode }] = await tx.select({ productCode: products.code }).from(products).where(eq(products.id, row.productId));
        const [{ testMethodCode }] = await tx.select({ testMethodCode: testMethods.code }).from(testMethods).where(eq(testMethods.id, row.testMethodId));
        const before = {
          code: row.code,
          name: row.name,
          productCode,
          testMethodCode: testMethodCode as NonNullable<typeof input.testMethodCode>,
          ageDays: row.ageDays,
          subgroupSize: row.subgroupSize,
          chartType: row.chartType,
          ruleSet: row.ruleSet,
          samplingPlan: row.samplingPlan,
          active: row.active,
        };
        const changed = (Object.keys(input) as (keyof typeof input)[]).filter((key) => input[key] !== undefined && input[key] !== before[key]);
        if (changed.length === 0) return false;
        const after = { ...before, ...Object.fromEntries(changed.map((key) => [key, input[key]])) } as typeof before;

        const issues = characteristicIssues(after);
        if (issues.length) throw badRequest(`${issues[0].path}: ${issues[0].message}`, issues);

        const fixed = changed.filter((key) => key === 'code' || key === 'productCode' || key === 'testMethodCode' || key === 'ageDays');
        if (fixed.length) {
          const [{ recorded }] = (await tx.execute<{ recorded: boolean }>(sql`select ${hasRecordedResults(sql`${id}::int`)} as recorded`)).rows;
          const names = { code: 'code', productCode: 'product', testMethodCode: 'test method', ageDays: 'age' };
          if (recorded) {
            const listed = new Intl.ListFormat('en-GB').format(fixed.map((key) => names[key]));
            throw conflict(`Results are recorded under ${before.code}, so its ${listed} cannot change. Deactivate it and add a new characteristic instead`);
          }
        }
        if (after.subgroupSize < before.subgroupSize) {
          const [{ most }] = await tx
            .select({ most: max(measurements.replicate) })
            .from(measurements)
            .where(and(eq(measurements.characteristicId, id), isNull(measurements.voidedAt)));
          if (most !== null && most > after.subgroupSize) {
            throw fieldConflict('subgroupSize', `Lots of ${before.code} already have up to ${most} readings stored, so the subgroup size cannot go below ${most}`);
          }
        }

        const changes: Partial<typeof characteristics.$inferInsert> = {};
        for (const key of changed) {
          if (key === 'productCode') changes.productId = await productIdFor(tx, after.productCode);
          else if (key === 'testMethodCode') {
            const method = await methodFor(tx, after.testMethodCode);
            changes.testMethodId = method.id;
            changes.unit = method.unit;
          } else Object.assign(changes, { [key]: after[key] });
        }
        if (changes.code !== undefined) await refuseTakenCode(tx, 'Characteristic', changes.code);
        await tx.update(characteristics).set(changes).where(eq(characteristics.id, id));
        await recordAudit(tx, { actorId: req.user!.id, action: auditAction(changes, changes.active), entity: 'characteristic', entityId: id, before, after });
        return changed.some((key) => chartSettings.has(key));
      }),
    );
    // Started after the commit, so the run reads the new settings.
    if (settingsChanged) await chartSettingsChanged(id, req.user!.id);
    const [characteristic] = await listCharacteristics(db, id);
    res.json(characteristic);
  });

  router.delete('/characteristics/:id', requireSession, admin, neverDeleted('Characteristics', 'Deactivate it instead: uploads and the SPC run then leave it out, and its charts stay readable.'));

  router.get('/lots', requireSession, async (req, res) => {
    const q = parseBody(listLotsQuerySchema, req.query);
    const rows = await db
      .select({ id: lots.id, lotNumber: lots.lotNumber, producedAt: lots.producedAt, shift: lots.shift, productCode: products.code, lineCode: productionLines.code })
      .from(lots)
      .innerJoin(products, eq(products.id, lots.productId))
      .innerJoin(productionLines, eq(productionLines.id, lots.lineId))
      .where(and(q.product ? eq(products.code, q.product) : undefined, q.q ? ilike(lots.lotNumber, `${q.q.replace(/[%_\\]/g, '\\$&')}%`) : undefined))
      .orderBy(desc(lots.producedAt))
      .limit(q.limit);
    res.json({ items: rows });
  });

  router.get('/lots/:lotNumber', requireSession, async (req, res) => {
    const { lotNumber } = parseBody(lotParamsSchema, req.params);
    const [lot] = await db
      .select({ id: lots.id, lotNumber: lots.lotNumber, producedAt: lots.producedAt, shift: lots.shift, productCode: products.code, productName: products.name, lineCode: productionLines.code })
      .from(lots)
      .innerJoin(products, eq(products.id, lots.productId))
      .innerJoin(productionLines, eq(productionLines.id, lots.lineId))
      .where(eq(lots.lotNumber, lotNumber));
    if (!lot) throw notFound(`Lot ${lotNumber}`);
    const results = await db
      .select({
        id: measurements.id,
        characteristicCode: characteristics.code,
        characteristicName: characteristics.name,
        unit: characteristics.unit,
        replicate: measurements.replicate,
        value: measurements.value,
        testedAt: measurements.testedAt,
        operator: measurements.operator,
        note: measurements.note,
        source: measurements.source,
        uploadId: measurements.uploadId,
        uploadFile: uploads.fileName,
      })
      .from(measurements)
      .innerJoin(characteristics, eq(characteristics.id, measurements.characteristicId))
      .leftJoin(uploads, eq(uploads.id, measurements.uploadId))
      // Naming the lot's characteristics lets the live key, which leads with the characteristic, find them.
      .where(
        and(
          eq(measurements.lotId, lot.id),
          isNull(measurements.voidedAt),
          sql`${measurements.characteristicId} in (select c.id from characteristics c join lots l on l.product_id = c.product_id where l.id = ${lot.id})`,
        ),
      )
      .orderBy(asc(characteristics.id), asc(measurements.replicate));
    // The revision in force when the lot was made judges it, not today's.
    const specRows = await db.execute<{ code: string; revision: number; lsl: number | null; usl: number | null; target: number | null; effective_from: Date }>(sql`
      select distinct on (c.code) c.code, s.revision, s.lsl, s.usl, s.target, s.effective_from
      from spec_limits s join characteristics c on c.id = s.characteristic_id
      where c.product_id = (select product_id from lots where id = ${lot.id}) and s.effective_from <= ${lot.producedAt.toISOString()}::timestamptz
      order by c.code, s.effective_from desc, s.revision desc`);
    const specs = Object.fromEntries(
      specRows.rows.map((s) => [s.code, { revision: s.revision, lsl: s.lsl, usl: s.usl, target: s.target, effectiveFrom: new Date(s.effective_from).toISOString() }]),
    );
    res.json({ ...lot, results, specs });
  });

  return router;
}
