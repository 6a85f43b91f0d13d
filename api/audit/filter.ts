// Which audit events a request means: the filter the list, the CSV and the audit pack share, read at the
// edge with zod and turned into one SQL condition, so the list and the export can never disagree.
import { sql, type SQL } from 'drizzle-orm';
import { z } from 'zod';
import { lineText, plantDay, recordId } from '@shared/schemas/fields';
import { readPlantDate } from '@shared/time';
import { auditActions, type AuditEntity } from '@api/db/audit-actions';

const entities = Object.keys(auditActions) as AuditEntity[];
const allActions = [...new Set(Object.values(auditActions).flat())] as string[];

/** A query string sends an empty field for "any": read it as absent. */
const blankAsAbsent = (v: unknown) => (v === '' ? undefined : v);

/** GET /api/v1/audit-events(.csv) filter fields; from and to are plant days. */
export const auditFilterSchema = z
  .object({
    /** Only events about this kind of record (lot, ncr, alarm, …). */
    entity: z.preprocess(blankAsAbsent, z.enum(entities as [AuditEntity, ...AuditEntity[]], { message: 'No such kind of record in the audit trail' }).optional()),
    /** Only events about this record: its id, or its number for a lot. */
    entityId: z.preprocess(blankAsAbsent, lineText('the record id', { max: 100 }).optional()),
    /** Only what this user did (a user id), or "system" for what the system did by itself. */
    actor: z.preprocess(blankAsAbsent, z.union([z.literal('system'), recordId('User id')]).optional()),
    /** Only this action (with an entity, one of that entity's actions). */
    action: z.preprocess(blankAsAbsent, z.string().refine((a) => allActions.includes(a), 'No such action in the audit trail').optional()),
    /** First plant day of the period, YYYY-MM-DD. */
    from: z.preprocess(blankAsAbsent, plantDay('the first day').optional()),
    /** Last plant day of the period (included), YYYY-MM-DD. */
    to: z.preprocess(blankAsAbsent, plantDay('the last day').optional()),
    /** Words to find in the reason, the record id, before, after or the user's name. */
    q: z.preprocess(blankAsAbsent, lineText('the search words', { max: 100 }).optional()),
  })
  .refine((f) => !f.from || !f.to || f.from <= f.to, { message: 'The first day comes after the last day', path: ['to'] })
  .refine((f) => !f.entity || !f.action || (auditActions[f.entity] as readonly string[]).includes(f.action), {
    message: 'That action is never recorded for that kind of record',
    path: ['action'],
  });

export type AuditFilter = z.infer<typeof auditFilterSchema>;

/** The filter as the values the SQL condition compares with; null means "any". */
export interface AuditBounds {
  entity: string | null;
  entityId: string | null;
  actorId: number | null;
  /** Only what the system did by itself. */
  system: boolean;
  action: string | null;
  /** The instant the first plant day starts, and the instant after the last one ends (ISO). */
  fromAt: string | null;
  toAt: string | null;
  /** An ILIKE pattern that finds the words anywhere. */
  pattern: string | null;
}

const dayAfter = (day: string) => new Date(Date.parse(`${day}T00:00:00Z`) + 86_400_000).toISOString().slice(0, 10);

/** The instant a plant day (YYYY-MM-DD) starts in the plant's zone. */
function dayStart(day: string, timeZone: string): string {
  const at = readPlantDate(day, { timeZone, dateFormat: 'yyyy-MM-dd' });
  if (!at) throw new Error(`Not a plant day: ${day}`);
  return at.toISOString();
}

export function auditBounds(f: AuditFilter, timeZone: string): AuditBounds {
  return {
    entity: f.entity ?? null,
    entityId: f.entityId ?? null,
    actorId: typeof f.actor === 'number' ? f.actor : null,
    system: f.actor === 'system',
    action: f.action ?? null,
    fromAt: f.from ? dayStart(f.from, timeZone) : null,
    toAt: f.to ? dayStart(dayAfter(f.to), timeZone) : null,
    // ILIKE's own wildcards and its escape character, typed by a user, are searched for as they are.
    pattern: f.q ? `%${f.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%` : null,
  };
}

/** How the condition reaches each value: a bound parameter, or (for COPY, which takes none) a setting of its transaction. */
export type BoundValue = (key: keyof AuditBounds) => SQL;

/** The bound values as query parameters. */
export const asParameters =
  (b: AuditBounds): BoundValue =>
  (key) =>
    sql`${b[key]}`;

/**
 * The condition on `e` (audit_events) and `u` (its actor in users, left-joined). Only sealed events: an
 * unsealed one exists only inside the transaction writing it.
 */
export function auditWhere(v: BoundValue): SQL {
  return sql`e.seq is not null
    and (${v('entity')}::text is null or e.entity = ${v('entity')}::text)
    and (${v('entityId')}::text is null or e.entity_id = ${v('entityId')}::text)
    and (${v('actorId')}::int is null or e.actor_id = ${v('actorId')}::int)
    and (not ${v('system')}::boolean or e.actor_id is null)
    and (${v('action')}::text is null or e.action = ${v('action')}::text)
    and (${v('fromAt')}::timestamptz is null or e.at >= ${v('fromAt')}::timestamptz)
    and (${v('toAt')}::timestamptz is null or e.at < ${v('toAt')}::timestamptz)
    and (${v('pattern')}::text is null or e.reason ilike ${v('pattern')}::text or e.entity_id ilike ${v('pattern')}::text
         or e.before::text ilike ${v('pattern')}::text or e.after::text ilike ${v('pattern')}::text or u.name ilike ${v('pattern')}::text)`;
}
