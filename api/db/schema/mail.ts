// Who is told about alarms, and the durable outbox of e-mail.
import { sql } from 'drizzle-orm';
import { boolean, check, index, integer, jsonb, pgEnum, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { users } from './users';
import { productionLines, products } from './catalogue';

/** The kinds of message the outbox sends; each has its composer and its dedupe key. */
export const mailKinds = ['alarm', 'alarm-reopened', 'alarm-assigned', 'digest', 'lot-hold', 'lot-release', 'ncr', 'ncr-action'] as const;
export type MailKind = (typeof mailKinds)[number];

/** What a message is about, so that the messages of an alarm, a lot or a report can be found. */
export interface MailRefs {
  alarmIds?: number[];
  lotIds?: number[];
  ncrId?: number;
  ncrActionId?: number;
}

export const mailStatusEnum = pgEnum('mail_status', ['pending', 'sent']);

/** Who is told about alarms of a product line or a product: at once, in the morning digest, or both. */
export const alarmSubscriptions = pgTable(
  'alarm_subscriptions',
  {
    id: serial('id').primaryKey(),
    userId: integer('user_id').notNull().references(() => users.id),
    lineId: integer('line_id').references(() => productionLines.id),
    productId: integer('product_id').references(() => products.id),
    immediate: boolean('immediate').notNull(),
    digest: boolean('digest').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex('alarm_subscriptions_line_key').on(t.userId, t.lineId).where(sql`line_id is not null`),
    uniqueIndex('alarm_subscriptions_product_key').on(t.userId, t.productId).where(sql`product_id is not null`),
    check('alarm_subscriptions_one_scope', sql`(line_id is null) <> (product_id is null)`),
  ],
);

/** Durable outbox: every e-mail is written here in the transaction that decides it, then sent with retries. */
export const mailOutbox = pgTable(
  'mail_outbox',
  {
    id: serial('id').primaryKey(),
    /** One message per alarm and recipient, or per digest day and recipient. */
    dedupeKey: text('dedupe_key').notNull().unique(),
    kind: text('kind').$type<MailKind>().notNull(),
    userId: integer('user_id').references(() => users.id),
    toAddress: text('to_address').notNull(),
    subject: text('subject').notNull(),
    textBody: text('text_body').notNull(),
    htmlBody: text('html_body').notNull(),
    refs: jsonb('refs').$type<MailRefs>().notNull().default({}),
    status: mailStatusEnum('status').notNull().default('pending'),
    attempts: integer('attempts').notNull().default(0),
    nextAttemptAt: timestamp('next_attempt_at', { withTimezone: true }).notNull().defaultNow(),
    /** A sender holds a message until then; another sender may take it over afterwards. */
    lockedUntil: timestamp('locked_until', { withTimezone: true }),
    lastError: text('last_error'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    sentAt: timestamp('sent_at', { withTimezone: true }),
  },
  (t) => [index('mail_outbox_pending_idx').on(t.nextAttemptAt).where(sql`status = 'pending'`)],
);
