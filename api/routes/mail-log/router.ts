import { Router } from 'express';
import { sql } from 'drizzle-orm';
import type { MailLogEntry, MailLogMessage, MailLogPage, MailLogStatus } from '@shared/schemas/mail-log';
import type { Database } from '@api/db/client';
import { notFound, parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { mailLogIdParamsSchema, mailLogQuerySchema } from './schema';

type Row = {
  id: number;
  kind: string;
  to_address: string;
  subject: string;
  status: MailLogStatus;
  attempts: number;
  last_error: string | null;
  created_at: Date;
  sent_at: Date | null;
  text_body?: string;
};

const entryOf = (r: Row): MailLogEntry => ({
  id: r.id,
  kind: r.kind,
  to: r.to_address,
  subject: r.subject,
  status: r.status,
  attempts: r.attempts,
  lastError: r.last_error,
  queuedAt: new Date(r.created_at).toISOString(),
  sentAt: r.sent_at ? new Date(r.sent_at).toISOString() : null,
});

const columns = sql`id, kind, to_address, subject, status, attempts, last_error, created_at, sent_at`;

/** The sent-mail log: every message of the durable outbox, for the managers who answer for what went out. */
export function mailLogRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession, requirePermission('mail.read'));

  router.get('/', async (req, res) => {
    const q = parseBody(mailLogQuerySchema, req.query);
    const status = q.status ?? null;
    const rows = await db.execute<Row>(sql`
      select ${columns} from mail_outbox where (${status}::mail_status is null or status = ${status}::mail_status)
      order by created_at desc, id desc limit ${q.pageSize} offset ${(q.page - 1) * q.pageSize}`);
    const total = await db.execute<{ n: number }>(sql`select count(*)::int as n from mail_outbox where (${status}::mail_status is null or status = ${status}::mail_status)`);
    res.json({ items: rows.rows.map(entryOf), page: q.page, pageSize: q.pageSize, total: total.rows[0].n } satisfies MailLogPage);
  });

  router.get('/:id', async (req, res) => {
    const { id } = parseBody(mailLogIdParamsSchema, req.params);
    const r = await db.execute<Row>(sql`select ${columns}, text_body from mail_outbox where id = ${id}`);
    if (!r.rows[0]) throw notFound(`Message ${id}`);
    res.json({ ...entryOf(r.rows[0]), text: r.rows[0].text_body ?? '' } satisfies MailLogMessage);
  });
  return router;
}
