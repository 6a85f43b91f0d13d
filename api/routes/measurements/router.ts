import { Router } from 'express';
import { and, eq, isNull } from 'drizzle-orm';
import { isTestMethodCode, resultFromEntry, roundHead50, squareHead50 } from '@shared/lab';
import type { CanonicalRow } from '@shared/ingest';
import type { Database } from '@api/db/client';
import { characteristics, measurements, testMethods } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { badRequest, fieldError, HttpError, notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { importResults } from '@api/ingest/import';
import type { ResultsChanged } from '@api/spc/results-changed';
import { respondToImport } from '../uploads/router';
import { correctMeasurementSchema, manualEntrySchema, measurementIdParamsSchema, type ManualEntry } from './schema';

/** Converts a typed-in lot to canonical rows; raw loads become results by the method's formula. */
async function manualRows(db: Database, entry: ManualEntry): Promise<CanonicalRow[]> {
  const methodByCharacteristic = new Map(
    (await db.select({ code: characteristics.code, method: testMethods.code }).from(characteristics).innerJoin(testMethods, eq(testMethods.id, characteristics.testMethodId))).map((r) => [r.code, r.method]),
  );
  const rows: CanonicalRow[] = [];
  entry.results.forEach((result, i) => {
    const method = methodByCharacteristic.get(result.characteristic);
    result.replicates.forEach((reading, r) => {
      let value = reading;
      if (result.entryUnit !== 'result') {
        if (!method || !isTestMethodCode(method)) throw badRequest(`results.${i}: unknown characteristic ${result.characteristic}`);
        try {
          value = resultFromEntry(method, { value: reading, unit: result.entryUnit, pullHead: result.pullHead === 'round50' ? roundHead50 : result.pullHead === 'square50' ? squareHead50 : undefined });
        } catch (err) {
          throw badRequest(`results.${i}: ${(err as Error).message}`);
        }
      }
      rows.push({
        // Rows count characteristics and readings; each column is named by the form's own field, so a row's error is a field's.
        row: (i + 1) * 100 + r + 1,
        cells: {
          lot: entry.lot,
          product: entry.product,
          line: entry.line,
          produced_at: entry.producedAt,
          shift: entry.shift,
          characteristic: result.characteristic,
          value: String(value),
          replicate: String(r + 1),
          tested_at: result.testedAt ?? new Date().toISOString(),
          operator: entry.operator,
          note: result.note,
        },
        sourceColumn: {
          lot: 'lot',
          product: 'product',
          line: 'line',
          produced_at: 'producedAt',
          shift: 'shift',
          operator: 'operator',
          characteristic: `results.${i}.characteristic`,
          value: `results.${i}.replicates.${r}`,
          replicate: `results.${i}.replicates.${r}`,
          tested_at: `results.${i}.testedAt`,
          note: `results.${i}.note`,
        },
      });
    });
  });
  return rows;
}

export function measurementsRouter(db: Database, resultsChanged: ResultsChanged): Router {
  const router = Router();
  router.use(requireSession);

  router.post('/', requirePermission('measurement.create'), async (req, res) => {
    const entry = parseBody(manualEntrySchema, req.body);
    const outcome = await importResults(db, { fileName: 'manual entry', actorId: req.user!.id, source: 'manual', rows: await manualRows(db, entry), decimalComma: false });
    if (outcome.kind === 'imported') {
      // Manual entry adds results as an upload does, and its run says 'upload' as it always has.
      await resultsChanged({ characteristicIds: outcome.characteristicIds, because: 'upload', by: req.user!.id, judge: outcome.toJudge });
      res.status(201).json({ rowsImported: outcome.rowsImported, measurementIds: outcome.measurementIds });
      return;
    }
    if (outcome.kind === 'rejected') {
      // A lot-level field repeats on every reading's row: its message is given once.
      const details = [...new Map(outcome.errors.map((e) => [`${e.column}\n${e.message}`, { path: e.column, message: e.message }])).values()];
      throw new HttpError(422, `Nothing was saved: ${details.length === 1 ? details[0].message : `${details.length} fields need correcting`}`, details);
    }
    respondToImport(res, outcome);
  });

  router.patch('/:id', requirePermission('measurement.correct'), async (req, res) => {
    const { id } = parseBody(measurementIdParamsSchema, req.params);
    const { value, reason } = parseBody(correctMeasurementSchema, req.body);
    const updated = await db.transaction(async (tx) => {
      const [before] = await tx
        .select({ id: measurements.id, value: measurements.value, characteristicId: measurements.characteristicId, min: testMethods.physicalMin, max: testMethods.physicalMax, unit: characteristics.unit })
        .from(measurements)
        .innerJoin(characteristics, eq(characteristics.id, measurements.characteristicId))
        .innerJoin(testMethods, eq(testMethods.id, characteristics.testMethodId))
        .where(and(eq(measurements.id, id), isNull(measurements.voidedAt)))
        .for('update', { of: measurements });
      if (!before) throw notFound('Measurement');
      if (value < before.min || value > before.max) throw fieldError('value', `${value} ${before.unit} is outside the possible range ${before.min}–${before.max} ${before.unit}`);
      const [after] = await tx.update(measurements).set({ value }).where(eq(measurements.id, id)).returning();
      await recordAudit(tx, { actorId: req.user!.id, action: 'correct', entity: 'measurement', entityId: id, before: { value: before.value }, after: { value }, reason });
      return after;
    });
    await resultsChanged({
      characteristicIds: [updated.characteristicId],
      because: 'correction',
      by: req.user!.id,
      judge: [{ lotId: updated.lotId, characteristicId: updated.characteristicId }],
    });
    res.json(updated);
  });

  return router;
}
