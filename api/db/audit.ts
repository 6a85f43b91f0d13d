import type { Database } from './client';
import { auditEvents } from './schema';
import type { AuditAction, AuditEntity } from './audit-actions';

type Executor = Pick<Database, 'insert'>;

interface AuditFacts {
  /** Who did it; null for what the system does by itself (e.g. closing an alarm whose signal is gone). */
  actorId: number | null;
  entityId?: string | number | null;
  before?: unknown;
  after?: unknown;
  reason?: string | null;
}

/** One audit-trail row: an entity of the list in audit-actions.ts with one of its actions. */
export type AuditEntry = { [E in AuditEntity]: AuditFacts & { entity: E; action: AuditAction<E> } }[AuditEntity];

/** Appends audit-trail rows; call inside the transaction of the change they record. */
export async function recordAudit(db: Executor, entries: AuditEntry | readonly AuditEntry[]): Promise<void> {
  const list: readonly AuditEntry[] = Array.isArray(entries) ? entries : [entries as AuditEntry];
  if (!list.length) return;
  await db.insert(auditEvents).values(
    list.map((e) => ({
      actorId: e.actorId,
      action: e.action,
      entity: e.entity,
      entityId: e.entityId == null ? null : String(e.entityId),
      before: e.before ?? null,
      after: e.after ?? null,
      reason: e.reason ?? null,
    })),
  );
}
