import { Router } from 'express';
import { sql } from 'drizzle-orm';
import type { AuditChainVerdict, AuditEventPage, AuditEventView, AuditFacets } from '@shared/schemas/audit-events';
import type { Database } from '@api/db/client';
import { verifyAuditChain } from '@api/db/audit-chain';
import { parseBody } from '@api/http/errors';
import { requirePermission, requireSession } from '@api/auth/session';
import { logger } from '@api/logger';
import { auditBounds, auditWhere, asParameters } from '@api/audit/filter';
import { auditTimeZone, writeAuditCsv } from '@api/audit/csv';
import { auditLink, auditSentence } from '@api/audit/words';
import { auditCsvQuerySchema, auditListQuerySchema } from './schema';

type EventRow = {
  seq: string;
  id: number;
  at: Date;
  actor_id: number | null;
  actor_name: string | null;
  actor_role: string | null;
  entity: string;
  entity_id: string | null;
  action: string;
  before: unknown;
  after: unknown;
  reason: string | null;
  label: string | null;
};

function eventOf(r: EventRow): AuditEventView {
  return {
    seq: Number(r.seq),
    id: r.id,
    at: new Date(r.at).toISOString(),
    actor: r.actor_id === null ? null : { id: r.actor_id, name: r.actor_name ?? `user ${r.actor_id}`, role: r.actor_role ?? '' },
    entity: r.entity,
    entityId: r.entity_id,
    action: r.action,
    sentence: auditSentence(r.entity, r.action, { id: r.entity_id, label: r.label, before: r.before, after: r.after }),
    before: r.before,
    after: r.after,
    reason: r.reason,
    link: auditLink(r.entity, r.entity_id),
  };
}

/** The audit trail for auditors: the list (newest first, keyset-paged by the chain's seq), its pick lists and the chain check. */
export function auditEventsRouter(db: Database): Router {
  const router = Router();
  router.use(requireSession, requirePermission('audit.read'));

  router.get('/', async (req, res) => {
    const q = parseBody(auditListQuerySchema, req.query);
    const where = auditWhere(asParameters(auditBounds(q, await auditTimeZone(db))));
    const after = q.after ?? null;
    // What people call the record (an NCR's number, a characteristic's code), looked up for the page only.
    const rows = (
      await db.execute<EventRow>(sql`
        select e.seq, e.id, e.at, e.actor_id, u.name as actor_name, u.role::text as actor_role, e.entity, e.entity_id, e.action, e.before, e.after, e.reason,
               case e.entity
                 when 'ncr' then (select number from ncrs where id = r.num)
                 when 'characteristic' then (select code from characteristics where id = r.num)
                 when 'product' then (select code from products where id = r.num)
                 when 'production line' then (select code from production_lines where id = r.num)
                 when 'user' then (select name from users where id = r.num)
               end as label
        from audit_events e
        left join users u on u.id = e.actor_id
        cross join lateral (select case when e.entity_id ~ '^[1-9][0-9]{0,8}$' then e.entity_id::int end as num) r
        where ${where} and (${after}::bigint is null or e.seq < ${after}::bigint)
        order by e.seq desc
        limit ${q.limit + 1}`)
    ).rows;
    const page = rows.slice(0, q.limit).map(eventOf);
    res.json({ items: page, nextCursor: rows.length > q.limit ? page[page.length - 1].seq : null } satisfies AuditEventPage);
  });

  router.get('/facets', async (_req, res) => {
    const entities = await db.execute<{ entity: string; actions: string[] }>(sql`
      select entity, array_agg(distinct action order by action) as actions from audit_events where seq is not null group by entity order by entity`);
    const actors = await db.execute<{ id: number; name: string; role: string }>(sql`
      select u.id, u.name, u.role::text as role from users u where exists (select 1 from audit_events e where e.actor_id = u.id) order by u.name, u.id`);
    const [span] = (
      await db.execute<{ system: boolean; first: Date | null; last: Date | null }>(sql`
        select exists (select 1 from audit_events where actor_id is null) as system, min(at) as first, max(at) as last from audit_events`)
    ).rows;
    res.json({
      entities: entities.rows,
      actors: actors.rows,
      systemActs: span.system,
      first: span.first ? new Date(span.first).toISOString() : null,
      last: span.last ? new Date(span.last).toISOString() : null,
    } satisfies AuditFacets);
  });

  router.get('/verify', async (_req, res) => {
    res.json((await verifyAuditChain(db)) satisfies AuditChainVerdict);
  });
  return router;
}

/**
 * GET /audit-events.csv, mounted at /api/v1: a path of its own beside the list's router. The session and
 * permission checks sit on the route, not on the router, which sees every request under /api/v1.
 */
export function auditCsvRouter(db: Database): Router {
  const router = Router();
  router.get('/audit-events.csv', requireSession, requirePermission('audit.read'), async (req, res) => {
    const filter = parseBody(auditCsvQuerySchema, req.query);
    const name = `audit-trail${filter.from ? `-from-${filter.from}` : ''}${filter.to ? `-to-${filter.to}` : ''}.csv`;
    res.setHeader('content-type', 'text/csv; charset=utf-8');
    res.setHeader('content-disposition', `attachment; filename="${name}"`);
    res.setHeader('cache-control', 'no-store');
    try {
      await writeAuditCsv(db, filter, res);
    } catch (err) {
      // Once rows have gone out the status cannot change: the cut-off download is the only way to say it failed.
      if (!res.headersSent) {
        res.removeHeader('content-disposition');
        throw err;
      }
      logger.warn({ err: (err as Error).message }, 'audit export stopped');
      res.destroy();
      return;
    }
    res.end();
  });
  return router;
}
