import { sql } from 'drizzle-orm';
import { boolean, customType, doublePrecision, index, integer, jsonb, pgEnum, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { roles } from '../../shared/schemas/users';

export const roleEnum = pgEnum('role', roles);

export const users = pgTable(
  'users',
  {
    id: serial('id').primaryKey(),
    email: text('email').notNull(),
    name: text('name').notNull(),
    role: roleEnum('role').notNull(),
    passwordHash: text('password_hash').notNull(),
    active: boolean('active').notNull().default(true),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('users_email_key').on(sql`lower(${t.email})`)],
);

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

const bytea = customType<{ data: Buffer }>({ dataType: () => 'bytea' });

export const chartTypeEnum = pgEnum('chart_type', ['xbar-r', 'xbar-s', 'imr']);
export const ruleSetEnum = pgEnum('rule_set', ['we', 'extended']);
export const uploadStatusEnum = pgEnum('upload_status', ['imported', 'rejected', 'voided']);
export const measurementSourceEnum = pgEnum('measurement_source', ['upload', 'manual']);

export const plants = pgTable('plants', {
  id: serial('id').primaryKey(),
  code: text('code').notNull().unique(),
  name: text('name').notNull(),
  /** IANA zone: local dates in uploads and the nightly run's clock are read in it. */
  timeZone: text('time_zone').notNull(),
  /** node-cron expression of the nightly SPC run in the plant's time zone. */
  nightlyRunCron: text('nightly_run_cron').notNull().default('0 2 * * *'),
});

export const productionLines = pgTable(
  'production_lines',
  {
    id: serial('id').primaryKey(),
    plantId: integer('plant_id').notNull().references(() => plants.id),
    code: text('code').notNull(),
    name: text('name').notNull(),
  },
  (t) => [uniqueIndex('production_lines_plant_code_key').on(t.plantId, t.code)],
);

export const products = pgTable('products', {
  id: serial('id').primaryKey(),
  plantId: integer('plant_id').notNull().references(() => plants.id),
  code: text('code').notNull().unique(),
  name: text('name').notNull(),
  family: text('family').notNull(),
  declaredClass: text('declared_class'),
  lineId: integer('line_id').references(() => productionLines.id),
  active: boolean('active').notNull().default(true),
});

export const testMethods = pgTable('test_methods', {
  id: serial('id').primaryKey(),
  code: text('code').notNull().unique(),
  name: text('name').notNull(),
  /** Published standard the lab follows, or "common practice". */
  standard: text('standard').notNull(),
  unit: text('unit').notNull(),
  state: text('state').notNull(),
  physicalMin: doublePrecision('physical_min').notNull(),
  physicalMax: doublePrecision('physical_max').notNull(),
  physicalMaxExclusive: boolean('physical_max_exclusive').notNull().default(false),
  decimals: integer('decimals').notNull(),
  rawLoad: text('raw_load'),
});

export const characteristics = pgTable('characteristics', {
  id: serial('id').primaryKey(),
  code: text('code').notNull().unique(),
  productId: integer('product_id').notNull().references(() => products.id),
  testMethodId: integer('test_method_id').notNull().references(() => testMethods.id),
  /** Specimen age at test in days; null for fresh-mortar tests. */
  ageDays: integer('age_days'),
  name: text('name').notNull(),
  unit: text('unit').notNull(),
  /** Replicates of one lot's sample: they form one subgroup. */
  subgroupSize: integer('subgroup_size').notNull(),
  chartType: chartTypeEnum('chart_type').notNull(),
  ruleSet: ruleSetEnum('rule_set').notNull().default('we'),
  samplingPlan: text('sampling_plan'),
  active: boolean('active').notNull().default(true),
});

/** Specification revisions: the one in force at a lot's production time applies to it. */
export const specLimits = pgTable(
  'spec_limits',
  {
    id: serial('id').primaryKey(),
    characteristicId: integer('characteristic_id').notNull().references(() => characteristics.id),
    revision: integer('revision').notNull(),
    lsl: doublePrecision('lsl'),
    usl: doublePrecision('usl'),
    target: doublePrecision('target'),
    effectiveFrom: timestamp('effective_from', { withTimezone: true }).notNull(),
    reason: text('reason'),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex('spec_limits_revision_key').on(t.characteristicId, t.revision)],
);

export const lots = pgTable(
  'lots',
  {
    id: serial('id').primaryKey(),
    lotNumber: text('lot_number').notNull().unique(),
    productId: integer('product_id').notNull().references(() => products.id),
    lineId: integer('line_id').notNull().references(() => productionLines.id),
    producedAt: timestamp('produced_at', { withTimezone: true }).notNull(),
    shift: text('shift'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('lots_product_produced_idx').on(t.productId, t.producedAt)],
);

export const uploads = pgTable(
  'uploads',
  {
    id: serial('id').primaryKey(),
    fileName: text('file_name').notNull(),
    sha256: text('sha256').notNull(),
    uploadedBy: integer('uploaded_by').references(() => users.id),
    uploadedAt: timestamp('uploaded_at', { withTimezone: true }).notNull().defaultNow(),
    status: uploadStatusEnum('status').notNull(),
    format: text('format').notNull().default('long'),
    rowsTotal: integer('rows_total').notNull(),
    rowsImported: integer('rows_imported').notNull().default(0),
    rowsRejected: integer('rows_rejected').notNull().default(0),
    /** Row-by-row validation errors of a rejected file. */
    errors: jsonb('errors'),
    /** The file exactly as received, kept as evidence. */
    content: bytea('content').notNull(),
    voidedAt: timestamp('voided_at', { withTimezone: true }),
    voidedBy: integer('voided_by').references(() => users.id),
    voidReason: text('void_reason'),
  },
  // The same bytes may be imported once; a rejected file may come again after it was fixed elsewhere.
  (t) => [uniqueIndex('uploads_sha256_kept_key').on(t.sha256).where(sql`status <> 'rejected'`)],
);

export const measurements = pgTable(
  'measurements',
  {
    id: serial('id').primaryKey(),
    lotId: integer('lot_id').notNull().references(() => lots.id),
    characteristicId: integer('characteristic_id').notNull().references(() => characteristics.id),
    replicate: integer('replicate').notNull(),
    value: doublePrecision('value').notNull(),
    testedAt: timestamp('tested_at', { withTimezone: true }),
    operator: text('operator'),
    note: text('note'),
    source: measurementSourceEnum('source').notNull(),
    uploadId: integer('upload_id').references(() => uploads.id),
    enteredBy: integer('entered_by').references(() => users.id),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    /** Set when the upload was voided: kept for the record, left out of every calculation. */
    voidedAt: timestamp('voided_at', { withTimezone: true }),
  },
  (t) => [
    uniqueIndex('measurements_live_key').on(t.lotId, t.characteristicId, t.replicate).where(sql`voided_at is null`),
    index('measurements_characteristic_idx').on(t.characteristicId),
    index('measurements_upload_idx').on(t.uploadId),
  ],
);

/** Things that happened at the plant and explain a chart: "New sand source", "Press recalibrated". */
export const processEvents = pgTable(
  'process_events',
  {
    id: serial('id').primaryKey(),
    plantId: integer('plant_id').notNull().references(() => plants.id),
    lineId: integer('line_id').references(() => productionLines.id),
    productId: integer('product_id').references(() => products.id),
    occurredAt: timestamp('occurred_at', { withTimezone: true }).notNull(),
    title: text('title').notNull(),
    description: text('description'),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('process_events_occurred_idx').on(t.occurredAt)],
);

/** Saved column mappings for lab exports that are not in the canonical layout. */
export const columnMappings = pgTable('column_mappings', {
  id: serial('id').primaryKey(),
  name: text('name').notNull().unique(),
  mapping: jsonb('mapping').notNull(),
  createdBy: integer('created_by').references(() => users.id),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
});
