import { Router } from 'express';
import { and, eq, isNull, max, sql } from 'drizzle-orm';
import { characteristicIssues } from '@shared/schemas/catalogue';
import type { Database } from '@api/db/client';
import { characteristics, measurements, products, specLimits, testMethods } from '@api/db/schema';
import { hasRecordedResults, listCharacteristics } from '@api/db/queries/catalogue';
import { recordAudit } from '@api/db/audit';
import { badRequest, conflict, notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { auditAction, claimingCode, fieldConflict, methodFor, neverDeleted, productIdFor, refuseTakenCode } from '@api/routes/catalogue-writes';
import { characteristicParamsSchema, createCharacteristicSchema, updateCharacteristicSchema } from './schema';

/** Called after a characteristic's chart type, subgroup size or run-rule set changed; its chart and alarms follow in an incremental run. */
export type ChartSettingsChanged = (characteristicId: number, userId: number) => Promise<void>;

/** The settings the SPC run computes a chart from. */
const chartSettings = new Set(['chartType', 'subgroupSize', 'ruleSet', 'capabilityThreshold']);

/**
 * The characteristics: a product × test method × age, with its chart settings and specification.
 * Every signed-in role reads them; the administrator adds and changes them ('catalogue.manage'). They
 * are never deleted but deactivated, and a code that records were made under stays as it is.
 */
export function characteristicsRouter(db: Database, chartSettingsChanged: ChartSettingsChanged): Router {
  const router = Router();
  router.use(requireSession);
  const admin = requirePermission('catalogue.manage');

  router.get('/', async (_req, res) => {
    res.json({ items: await listCharacteristics(db) });
  });

  router.post('/', admin, async (req, res) => {
    const input = parseBody(createCharacteristicSchema, req.body);
    const id = await claimingCode(db, 'Characteristic', input.code, async (tx) => {
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
          capabilityThreshold: input.capabilityThreshold ?? null,
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
    });
    const [characteristic] = await listCharacteristics(db, id);
    res.status(201).json(characteristic);
  });

  router.patch('/:id', admin, async (req, res) => {
    const { id } = parseBody(characteristicParamsSchema, req.params);
    const input = parseBody(updateCharacteristicSchema, req.body);
    const settingsChanged = await claimingCode(db, 'Characteristic', input.code, async (tx) => {
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
        capabilityThreshold: row.capabilityThreshold,
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
    });
    // Started after the commit, so the run reads the new settings.
    if (settingsChanged) await chartSettingsChanged(id, req.user!.id);
    const [characteristic] = await listCharacteristics(db, id);
    res.json(characteristic);
  });

  router.delete('/:id', admin, neverDeleted('Characteristics', 'Deactivate it instead: uploads and the SPC run then leave it out, and its charts stay readable.'));

  return router;
}
