// The audit trail.
import { sql } from 'drizzle-orm';
import { bigint, index, integer, jsonb, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { users } from './users';

/**
 * Every change a certification audit may ask about: who, when, what, before and after. Append-only and
 * chained: when the writing transaction commits, each row gets the next place in the chain (`seq`), the
 * previous row's hash and its own hash over its content and that previous hash (migration 0016,
 * function audit_event_hash). Triggers refuse UPDATE, DELETE and TRUNCATE of a committed row.
 */
export const auditEvents = pgTable(
  'audit_events',
  {
    id: serial('id').primaryKey(),
    at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
    actorId: integer('actor_id').references(() => users.id),
    action: text('action').notNull(),
    entity: text('entity').notNull(),
    entityId: text('entity_id'),
    before: jsonb('before'),
    after: jsonb('after'),
    reason: text('reason'),
    /** The row's place in the chain, 1, 2, 3, … in commit order; set by the database at commit. */
    seq: bigint('seq', { mode: 'number' }),
    /** The hash of the row before it in the chain (64 zeros for the first). */
    prevHash: text('prev_hash'),
    /** SHA-256 (hex) over prevHash, seq and the row's content; see audit_event_hash. */
    hash: text('hash'),
  },
  (t) => [
    index('audit_events_entity_idx').on(t.entity, t.entityId),
    index('audit_events_at_idx').on(t.at),
    uniqueIndex('audit_events_seq_idx').on(t.seq).where(sql`seq is not null`),
    index('audit_events_actor_idx').on(t.actorId, t.at),
  ],
);
