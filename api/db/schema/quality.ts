// Stopping bad product and following it up: lot holds, nonconformance reports (NCRs) with their lots,
// alarms, actions and attachments. The words of each state live in shared/schemas/ncrs.ts and lots.ts.
import { sql } from 'drizzle-orm';
import { boolean, date, doublePrecision, index, integer, pgEnum, pgTable, primaryKey, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { users } from './users';
import { plants, products } from './catalogue';
import { lots } from './results';
import { alarms } from './spc';
import { storedFiles } from './files';
import { ncrStatuses, ncrSeverities, ncrActionKinds, lotDispositions } from '../../../shared/schemas/ncrs';
import { holdSources } from '../../../shared/schemas/lots';

export const ncrStatusEnum = pgEnum('ncr_status', ncrStatuses);
export const ncrSeverityEnum = pgEnum('ncr_severity', ncrSeverities);
export const ncrActionKindEnum = pgEnum('ncr_action_kind', ncrActionKinds);
export const lotDispositionEnum = pgEnum('lot_disposition', lotDispositions);
export const holdSourceEnum = pgEnum('hold_source', holdSources);

/** The next NCR number of a plant and year: taken by UPDATE … RETURNING inside the raising transaction, so numbers are gap-free. */
export const ncrCounters = pgTable(
  'ncr_counters',
  {
    plantId: integer('plant_id')
      .notNull()
      .references(() => plants.id),
    year: integer('year').notNull(),
    lastNumber: integer('last_number').notNull(),
  },
  (t) => [primaryKey({ columns: [t.plantId, t.year] })],
);

/** A nonconformance report: what went wrong, which lots, why, what is done about it, and who decided. */
export const ncrs = pgTable(
  'ncrs',
  {
    id: serial('id').primaryKey(),
    plantId: integer('plant_id')
      .notNull()
      .references(() => plants.id),
    /** NCR-<year>-<4 digits>; year and sequence kept apart for sorting and the uniqueness check. */
    number: text('number').notNull().unique(),
    year: integer('year').notNull(),
    sequence: integer('sequence').notNull(),
    title: text('title').notNull(),
    description: text('description').notNull(),
    productId: integer('product_id').references(() => products.id),
    severity: ncrSeverityEnum('severity').notNull(),
    status: ncrStatusEnum('status').notNull().default('open'),
    /** alarms, lot or direct: where it was raised from. */
    raisedFrom: text('raised_from').notNull(),
    assigneeId: integer('assignee_id').references(() => users.id),
    /** Root cause: one of the six categories (shared/schemas/causes.ts) and the analysis. */
    rootCauseCategory: text('root_cause_category'),
    rootCauseAnalysis: text('root_cause_analysis'),
    approvedAt: timestamp('approved_at', { withTimezone: true }),
    approvedBy: integer('approved_by').references(() => users.id),
    approvalNote: text('approval_note'),
    /** Closure: whether the actions worked, how that was checked, and who closed it. */
    effectivenessCheck: text('effectiveness_check'),
    /** The effectiveness check's verdict: true, the actions worked; false, they did not (the NCR stays open or is reopened). */
    effective: boolean('effective'),
    closedAt: timestamp('closed_at', { withTimezone: true }),
    closedBy: integer('closed_by').references(() => users.id),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [
    uniqueIndex('ncrs_plant_year_sequence_key').on(t.plantId, t.year, t.sequence),
    index('ncrs_status_idx').on(t.status),
  ],
);

/** A lot an NCR concerns, with the quantity affected and the decision on it (disposition). */
export const ncrLots = pgTable(
  'ncr_lots',
  {
    ncrId: integer('ncr_id')
      .notNull()
      .references(() => ncrs.id),
    lotId: integer('lot_id')
      .notNull()
      .references(() => lots.id),
    /** Tonnes of the lot affected. */
    quantityT: doublePrecision('quantity_t'),
    disposition: lotDispositionEnum('disposition'),
    /** Downgrade: the product the lot is sold as instead. */
    downgradeProductId: integer('downgrade_product_id').references(() => products.id),
    dispositionNote: text('disposition_note'),
    disposedAt: timestamp('disposed_at', { withTimezone: true }),
    disposedBy: integer('disposed_by').references(() => users.id),
  },
  (t) => [primaryKey({ columns: [t.ncrId, t.lotId] }), index('ncr_lots_lot_idx').on(t.lotId)],
);

/** The alarms an NCR was raised from or linked to. */
export const ncrAlarms = pgTable(
  'ncr_alarms',
  {
    ncrId: integer('ncr_id')
      .notNull()
      .references(() => ncrs.id),
    alarmId: integer('alarm_id')
      .notNull()
      .references(() => alarms.id),
  },
  (t) => [primaryKey({ columns: [t.ncrId, t.alarmId] }), index('ncr_alarms_alarm_idx').on(t.alarmId)],
);

/** A corrective or preventive action of an NCR: who does what by when, and the evidence it was done. */
export const ncrActions = pgTable(
  'ncr_actions',
  {
    id: serial('id').primaryKey(),
    ncrId: integer('ncr_id')
      .notNull()
      .references(() => ncrs.id),
    kind: ncrActionKindEnum('kind').notNull(),
    description: text('description').notNull(),
    ownerId: integer('owner_id')
      .notNull()
      .references(() => users.id),
    /** A calendar day at the plant (no time of day). */
    dueDate: date('due_date', { mode: 'string' }).notNull(),
    doneDate: date('done_date', { mode: 'string' }),
    evidence: text('evidence'),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('ncr_actions_ncr_idx').on(t.ncrId), index('ncr_actions_open_due_idx').on(t.dueDate).where(sql`done_date is null`)],
);

/** A file attached to an NCR (photo, PDF, instrument file): its bytes are a stored file. */
export const ncrAttachments = pgTable(
  'ncr_attachments',
  {
    id: serial('id').primaryKey(),
    ncrId: integer('ncr_id')
      .notNull()
      .references(() => ncrs.id),
    fileId: integer('file_id')
      .notNull()
      .references(() => storedFiles.id),
    note: text('note'),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('ncr_attachments_ncr_idx').on(t.ncrId)],
);

/**
 * A lot held back from dispatch: by the system when a result is out of specification, by a person,
 * or by an NCR's containment. At most one hold of a lot is open; release closes it with a reason.
 */
export const lotHolds = pgTable(
  'lot_holds',
  {
    id: serial('id').primaryKey(),
    lotId: integer('lot_id')
      .notNull()
      .references(() => lots.id),
    source: holdSourceEnum('source').notNull(),
    reason: text('reason').notNull(),
    alarmId: integer('alarm_id').references(() => alarms.id),
    ncrId: integer('ncr_id').references(() => ncrs.id),
    /** null: put on hold by the system (out of specification). */
    placedBy: integer('placed_by').references(() => users.id),
    placedAt: timestamp('placed_at', { withTimezone: true }).notNull().defaultNow(),
    releasedAt: timestamp('released_at', { withTimezone: true }),
    releasedBy: integer('released_by').references(() => users.id),
    releaseReason: text('release_reason'),
  },
  (t) => [uniqueIndex('lot_holds_open_key').on(t.lotId).where(sql`released_at is null`), index('lot_holds_lot_idx').on(t.lotId)],
);
