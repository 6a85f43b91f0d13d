import { Router, type RequestHandler } from 'express';
import multer from 'multer';
import { sql } from 'drizzle-orm';
import { z } from 'zod';
import type { NcrActionDue, NcrList, NcrView } from '@shared/schemas/ncrs';
import type { Database } from '@api/db/client';
import { badRequest, HttpError, notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { getFile, StoredFileDamaged } from '@api/files/store';
import { logger } from '@api/logger';
import { MAX_ATTACHMENT_BYTES, MAX_ATTACHMENTS_PER_REQUEST } from '@api/ncrs/attachments';
import { dueActions, listNcrs, loadNcrView } from '@api/ncrs/view';
import { addAction, attachFiles, raiseNcr, transitionNcr, updateAction, updateNcr, type Actor } from '@api/ncrs/writes';
import {
  createNcrActionSchema,
  createNcrSchema,
  listNcrsQuerySchema,
  ncrActionParamsSchema,
  ncrAttachmentFieldsSchema,
  ncrAttachmentParamsSchema,
  ncrParamsSchema,
  ncrTransitionSchema,
  updateNcrActionSchema,
  updateNcrSchema,
} from './schema';

const MB = MAX_ATTACHMENT_BYTES / 1024 / 1024;

/** Multipart field `file` (up to MAX_ATTACHMENTS_PER_REQUEST files) and `note`, in memory; too large a file answers 413. */
const receiveFiles: RequestHandler = (req, res, next) => {
  multer({ storage: multer.memoryStorage(), defParamCharset: 'utf8', limits: { fileSize: MAX_ATTACHMENT_BYTES, files: MAX_ATTACHMENTS_PER_REQUEST, fields: 5, parts: MAX_ATTACHMENTS_PER_REQUEST + 5 } }).array(
    'file',
    MAX_ATTACHMENTS_PER_REQUEST,
  )(req, res, (err: unknown) => {
    const code = (err as { code?: string })?.code;
    if (code === 'LIMIT_FILE_SIZE') return next(new HttpError(413, `A file is larger than ${MB} MB; attach a smaller photo or split the file`));
    if (code === 'LIMIT_FILE_COUNT' || code === 'LIMIT_UNEXPECTED_FILE') return next(badRequest(`Attach at most ${MAX_ATTACHMENTS_PER_REQUEST} files at a time, in the form field "file"`));
    if (err) return next(badRequest(`The attachment could not be read: ${(err as Error).message}`));
    const files = req.files as Express.Multer.File[] | undefined;
    if (!files?.length) return next(badRequest('Attach a file in the form field "file"'));
    next();
  });
};

const actorOf = (user: Express.User): Actor => ({ id: user.id, name: user.name, role: user.role });
const overdueQuerySchema = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) });

/** Nonconformance reports: everyone reads them; lab staff raise them and add evidence; managers run them to closure. */
export function ncrsRouter(db: Database, publicUrl: string): Router {
  const router = Router();
  router.use(requireSession);

  const view = async (id: number): Promise<NcrView> => {
    const v = await loadNcrView(db, id, publicUrl);
    if (!v) throw notFound(`NCR ${id}`);
    return v;
  };

  router.get('/', requirePermission('ncr.read'), async (req, res) => {
    const q = parseBody(listNcrsQuerySchema, req.query);
    res.json((await listNcrs(db, q)) satisfies NcrList);
  });

  router.get('/overdue-actions', requirePermission('ncr.read'), async (req, res) => {
    const q = parseBody(overdueQuerySchema, req.query);
    res.json((await dueActions(db, { limit: q.limit })) satisfies NcrActionDue[]);
  });

  router.post('/', requirePermission('ncr.raise'), async (req, res) => {
    const input = parseBody(createNcrSchema, req.body);
    const id = await raiseNcr(db, input, actorOf(req.user!), publicUrl);
    res.status(201).json(await view(id));
  });

  router.get('/:id', requirePermission('ncr.read'), async (req, res) => {
    const { id } = parseBody(ncrParamsSchema, req.params);
    res.json(await view(id));
  });

  router.patch('/:id', requirePermission('ncr.manage'), async (req, res) => {
    const { id } = parseBody(ncrParamsSchema, req.params);
    const input = parseBody(updateNcrSchema, req.body);
    await updateNcr(db, id, input, actorOf(req.user!), publicUrl);
    res.json(await view(id));
  });

  router.post('/:id/transitions', requirePermission('ncr.manage'), async (req, res) => {
    const { id } = parseBody(ncrParamsSchema, req.params);
    const input = parseBody(ncrTransitionSchema, req.body);
    await transitionNcr(db, id, input, actorOf(req.user!), publicUrl);
    res.json(await view(id));
  });

  router.post('/:id/actions', requirePermission('ncr.manage'), async (req, res) => {
    const { id } = parseBody(ncrParamsSchema, req.params);
    const input = parseBody(createNcrActionSchema, req.body);
    await addAction(db, id, input, actorOf(req.user!));
    res.status(201).json(await view(id));
  });

  // Owners (lab staff) record evidence and the done date; the rest is checked in updateAction.
  router.patch('/:id/actions/:actionId', requirePermission('ncr.raise'), async (req, res) => {
    const { id, actionId } = parseBody(ncrActionParamsSchema, req.params);
    const input = parseBody(updateNcrActionSchema, req.body);
    await updateAction(db, id, actionId, input, actorOf(req.user!));
    res.json(await view(id));
  });

  router.post(
    '/:id/attachments',
    requirePermission('ncr.raise'),
    (req, _res, next) => {
      // The id is checked before the body is read.
      parseBody(ncrParamsSchema, req.params);
      next();
    },
    receiveFiles,
    async (req, res) => {
      const { id } = parseBody(ncrParamsSchema, req.params);
      const { note } = parseBody(ncrAttachmentFieldsSchema, req.body ?? {});
      const files = (req.files as Express.Multer.File[]).map((f) => ({ originalName: f.originalname, bytes: f.buffer }));
      await attachFiles(db, id, files, note, actorOf(req.user!));
      res.status(201).json(await view(id));
    },
  );

  router.get('/:id/attachments/:attachmentId', requirePermission('ncr.read'), async (req, res) => {
    const { id, attachmentId } = parseBody(ncrAttachmentParamsSchema, req.params);
    const row = await db.execute<{ file_id: number }>(sql`select file_id from ncr_attachments where id = ${attachmentId} and ncr_id = ${id}`);
    if (!row.rows[0]) throw notFound(`Attachment ${attachmentId} of NCR ${id}`);
    const file = await getFile(db, row.rows[0].file_id).catch((err: unknown) => {
      if (!(err instanceof StoredFileDamaged)) throw err;
      logger.error({ ncrId: id, attachmentId, fileId: err.fileId }, 'NCR attachment does not match its fingerprint');
      throw new HttpError(500, `The stored bytes of attachment ${attachmentId} no longer match the size and SHA-256 recorded when it arrived; ask the administrator to restore it from a backup`);
    });
    if (!file) throw notFound(`Attachment ${attachmentId} of NCR ${id}`);
    // Always a download, never shown in the browser: the type read from the bytes, no sniffing, no scripts.
    res.set({
      'X-Content-Type-Options': 'nosniff',
      'Content-Security-Policy': "default-src 'none'; sandbox",
      'X-Content-SHA256': file.sha256,
      Digest: `sha-256=${Buffer.from(file.sha256, 'hex').toString('base64')}`,
      'Cache-Control': 'private, no-store',
    });
    res.type(file.contentType).attachment(file.fileName).send(file.bytes);
  });

  return router;
}
