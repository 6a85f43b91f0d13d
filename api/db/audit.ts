import type { Database } from './client';
import { auditEvents } from './schema';

type Executor = Pick<Database, 'insert'>;

export interface AuditEntry {
  actorId: number | null;
  action: string;
  entity: string;
  entityId?: string | number | null;
  before?: unknown;
  after?: unknown;
  reason?: string | null;
}

/** Appends one audit-trail row; call inside the transaction of the change it records. */
export async function recordAudit(db: Executor, e: AuditEntry): Promise<void> {
  await db.insert(auditEvents).values({
    actorId: e.actorId,
    action: e.action,
    entity: e.entity,
    entityId: e.entityId == null ? null : String(e.entityId),
    before: e.before ?? null,
    after: e.after ?? null,
    reason: e.reason ?? null,
  });
}
