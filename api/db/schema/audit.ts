// The audit trail.
import { index, integer, jsonb, pgTable, serial, text, timestamp } from 'drizzle-orm/pg-core';
import { users } from './users';

/** Every change a certification audit may ask about: who, when, what, before and after. Append-only. */
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
  },
  (t) => [index('audit_events_entity_idx').on(t.entity, t.entityId), index('audit_events_at_idx').on(t.at)],
);
