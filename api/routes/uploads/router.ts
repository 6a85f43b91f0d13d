import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { and, desc, eq, sql } from 'drizzle-orm';
import { canonicalColumns, type RowError } from '@shared/ingest';
import { csvDocument } from '@shared/csv';
import { rowErrorDetail } from '@shared/schemas/errors';
import type { Database } from '@api/db/client';
import { measurements, uploads, users } from '@api/db/schema';
import { recordAudit } from '@api/db/audit';
import { logger } from '@api/logger';
import { badRequest, HttpError, notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { importResults, type ImportOutcome } from '@api/ingest/import';
import { getFile, StoredFileDamaged } from '@api/files/store';
import type { ResultsChanged } from '@api/spc/results-changed';
import type { Json } from '@api/http/json';
import type { UploadDetail, UploadImported, UploadListItem, UploadVoided } from '@shared/schemas/uploads';
import { listUploadsQuerySchema, uploadFieldsSchema, uploadIdParamsSchema, voidUploadSchema } from './schema';

export const MAX_UPLOAD_BYTES = 20 * 1024 * 1024;

const receiveFile: RequestHandler = (req, res, next) => {
  multer({ storage: multer.memoryStorage(), limits: { fileSize: MAX_UPLOAD_BYTES, files: 1, fields: 10 } }).single('file')(req, res, (err: unknown) => {
    if ((err as { code?: string })?.code === 'LIMIT_FILE_SIZE') return next(new HttpError(413, `The file is larger than ${MAX_UPLOAD_BYTES / 1024 / 1024} MB; split it into shifts or weeks`));
    if (err) return next(badRequest(`The upload could not be read: ${(err as Error).message}`));
    if (!req.file) return next(badRequest('Attach the CSV file in the form field "file"'));
    next();
  });
};

export const errorReportCsv = (errors: RowError[]) => csvDocument([['row', 'column', 'message'], ...errors.map((e) => [e.row, e.column, e.message])]);

const uploadColumns = {
  id: uploads.id,
  fileName: uploads.fileName,
  sha256: uploads.sha256,
  sizeBytes: uploads.sizeBytes,
  uploadedAt: uploads.uploadedAt,
  status: uploads.status,
  format: uploads.format,
  rowsTotal: uploads.rowsTotal,
  rowsImported: uploads.rowsImported,
  rowsRejected: uploads.rowsRejected,
  voidedAt: uploads.voidedAt,
  voidReason: uploads.voidReason,
  uploadedById: uploads.uploadedBy,
  uploadedByName: users.name,
};

/** 201 for an import; a refusal is thrown as 409 (the same file before) or 422 (each row to correct as a detail). */
export function respondToImport(res: Parameters<RequestHandler>[1], outcome: ImportOutcome): void {
  if (outcome.kind === 'duplicate-file') {
    throw new HttpError(409, `This file was already imported as upload ${outcome.uploadId} on ${outcome.uploadedAt} (plant time)`, undefined, { uploadId: outcome.uploadId });
  } else if (outcome.kind === 'rejected') {
    const rows = new Set(outcome.errors.map((e) => e.row)).size;
    const message = `Nothing was imported: ${rows} row${rows === 1 ? '' : 's'} need${rows === 1 ? 's' : ''} correcting`;
    throw new HttpError(422, message, outcome.errors.map(rowErrorDetail), outcome.uploadId === null ? {} : { uploadId: outcome.uploadId });
  } else {
    // Only a file reaches here imported (manual entry answers its own 201), and a file always has its upload.
    res.status(201).json({ id: outcome.uploadId!, rowsImported: outcome.rowsImported } satisfies UploadImported);
  }
}

export function uploadsRouter(db: Database, resultsChanged: ResultsChanged): Router {
  const router = Router();
  router.use(requireSession);

  router.get('/template.csv', (_req, res) => {
    res.type('text/csv').attachment('prismline-results-template.csv');
    res.send(`${canonicalColumns.join(',')}\r\nL1-261130-E1,HVL25,L1,2026-11-30T06:40,HVL25-FLOW,146,early,1,2026-11-30T07:15,AT,\r\n`);
  });

  router.get('/', async (req, res) => {
    const q = parseBody(listUploadsQuerySchema, req.query);
    const rows = await db
      .select(uploadColumns)
      .from(uploads)
      .leftJoin(users, eq(users.id, uploads.uploadedBy))
      .where(q.status ? eq(uploads.status, q.status) : undefined)
      .orderBy(desc(uploads.uploadedAt), desc(uploads.id))
      .limit(q.limit);
    res.json({ items: rows } satisfies { items: Json<UploadListItem>[] });
  });

  router.post('/', requirePermission('upload.create'), receiveFile, async (req, res) => {
    const fields = parseBody(uploadFieldsSchema, req.body);
    const outcome = await importResults(db, {
      fileName: req.file!.originalname.slice(0, 255),
      content: req.file!.buffer,
      actorId: req.user!.id,
      source: 'upload',
      mapping: fields.mapping,
      dialect: { delimiter: fields.delimiter, decimalComma: fields.decimalComma },
    });
    if (outcome.kind === 'imported') await resultsChanged({ characteristicIds: outcome.characteristicIds, because: 'upload', by: req.user!.id, judge: outcome.toJudge });
    respondToImport(res, outcome);
  });

  router.get('/:id', async (req, res) => {
    const { id } = parseBody(uploadIdParamsSchema, req.params);
    const [row] = await db.select({ ...uploadColumns, errors: uploads.errors }).from(uploads).leftJoin(users, eq(users.id, uploads.uploadedBy)).where(eq(uploads.id, id));
    if (!row) throw notFound('Upload');
    res.json(row satisfies Json<UploadDetail>);
  });

  router.get('/:id/errors.csv', async (req, res) => {
    const { id } = parseBody(uploadIdParamsSchema, req.params);
    const [row] = await db.select({ errors: uploads.errors, fileName: uploads.fileName }).from(uploads).where(eq(uploads.id, id));
    if (!row) throw notFound('Upload');
    res.type('text/csv').attachment(`errors-upload-${id}.csv`).send(errorReportCsv((row.errors as RowError[] | null) ?? []));
  });

  router.get('/:id/file', async (req, res) => {
    const { id } = parseBody(uploadIdParamsSchema, req.params);
    const [row] = await db.select({ fileId: uploads.fileId }).from(uploads).where(eq(uploads.id, id));
    if (!row) throw notFound('Upload');
    // Evidence is handed out only as it was received: the same length and the same fingerprint.
    const file = await getFile(db, row.fileId).catch((err: unknown) => {
      if (!(err instanceof StoredFileDamaged)) throw err;
      logger.error({ uploadId: id, fileId: err.fileId, storedBytes: err.storedBytes, recordedBytes: err.recordedBytes }, 'kept upload file does not match its fingerprint');
      throw new HttpError(500, `The stored file of upload ${id} no longer matches the size and SHA-256 fingerprint recorded when it arrived; ask the administrator to restore it from a backup`);
    });
    if (!file) throw notFound('Upload file');
    res.type('application/octet-stream').attachment(file.fileName).send(file.bytes);
  });

  router.post('/:id/void', requirePermission('upload.void'), async (req, res) => {
    const { id } = parseBody(uploadIdParamsSchema, req.params);
    const { reason } = parseBody(voidUploadSchema, req.body);
    const result = await db.transaction(async (tx) => {
      const [upload] = await tx.select({ id: uploads.id, status: uploads.status }).from(uploads).where(eq(uploads.id, id)).for('update');
      if (!upload) throw notFound('Upload');
      if (upload.status !== 'imported') throw new HttpError(409, `Upload ${id} is ${upload.status}; only an imported upload can be voided`);
      const voided = await tx
        .update(measurements)
        .set({ voidedAt: sql`now()` })
        .where(and(eq(measurements.uploadId, id), sql`${measurements.voidedAt} is null`))
        .returning({ characteristicId: measurements.characteristicId });
      await tx.update(uploads).set({ status: 'voided', voidedAt: sql`now()`, voidedBy: req.user!.id, voidReason: reason }).where(eq(uploads.id, id));
      await recordAudit(tx, { actorId: req.user!.id, action: 'void', entity: 'upload', entityId: id, reason, after: { measurementsVoided: voided.length } });
      return { measurementsVoided: voided.length, characteristicIds: [...new Set(voided.map((v) => v.characteristicId))] };
    });
    await resultsChanged({ characteristicIds: result.characteristicIds, because: 'void', by: req.user!.id });
    res.json({ id, status: 'voided', measurementsVoided: result.measurementsVoided } satisfies UploadVoided);
  });

  return router;
}
