import { sql } from 'drizzle-orm';
import { boolean, check, customType, doublePrecision, index, integer, jsonb, pgEnum, pgTable, primaryKey, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
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
    /** false: the line takes no new results; its lots and their records stay. */
    active: boolean('active').notNull().default(true),
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
    // References checked once per statement by trigger (migration 0004), not per row: see DEVELOPERS.md.
    productId: integer('product_id').notNull(),
    lineId: integer('line_id').notNull(),
    producedAt: timestamp('produced_at', { withTimezone: true }).notNull(),
    shift: text('shift'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  // No index on (product, produced_at): lots are read by id or number, and the list of a product's lots
  // sorts a few thousand rows, while that index made storing a file of new lots about 40 % slower.
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
    /** Length of the file as received, in bytes; the file itself is in upload_file_parts. */
    sizeBytes: integer('size_bytes').notNull(),
    voidedAt: timestamp('voided_at', { withTimezone: true }),
    voidedBy: integer('voided_by').references(() => users.id),
    voidReason: text('void_reason'),
  },
  // The same bytes may be imported once; a rejected file may come again after it was fixed elsewhere.
  (t) => [uniqueIndex('uploads_sha256_kept_key').on(t.sha256).where(sql`status <> 'rejected'`)],
);

/**
 * The file of an upload exactly as received, kept as evidence, in parts of FILE_PART_BYTES in order.
 * Parts go in by COPY a megabyte at a time: one 10 MB value as a query parameter cost PostgreSQL about
 * five times as long (copies of the whole value at each step), holding back the upload's first rows.
 */
export const uploadFileParts = pgTable(
  'upload_file_parts',
  {
    uploadId: integer('upload_id')
      .notNull()
      .references(() => uploads.id, { onDelete: 'cascade' }),
    /** 0 for the first megabyte, then 1, 2, … */
    part: integer('part').notNull(),
    bytes: bytea('bytes').notNull(),
  },
  (t) => [primaryKey({ columns: [t.uploadId, t.part] })],
);

export const measurements = pgTable(
  'measurements',
  {
    id: serial('id').primaryKey(),
    // lot, characteristic, upload and user references are checked once per statement by trigger
    // (migration 0004), not per row: a 100,000-row upload pays one join instead of 400,000 lookups.
    lotId: integer('lot_id').notNull(),
    characteristicId: integer('characteristic_id').notNull(),
    replicate: integer('replicate').notNull(),
    value: doublePrecision('value').notNull(),
    testedAt: timestamp('tested_at', { withTimezone: true }),
    operator: text('operator'),
    note: text('note'),
    source: measurementSourceEnum('source').notNull(),
    uploadId: integer('upload_id'),
    enteredBy: integer('entered_by'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    /** Set when the upload was voided: kept for the record, left out of every calculation. */
    voidedAt: timestamp('voided_at', { withTimezone: true }),
  },
  // Two B-trees a new row, not four: the live key leads with the characteristic, so it also serves the
  // SPC run's reads of one characteristic, and queries by lot name the lot's characteristics; voided rows
  // have a small index of their own, with the id so that the newest is read from the index alone; an upload's rows lie together on disk in upload order, which a BRIN
  // index finds for a void at almost no cost per row.
  (t) => [
    uniqueIndex('measurements_live_key').on(t.characteristicId, t.lotId, t.replicate).where(sql`voided_at is null`),
    index('measurements_voided_idx').on(t.characteristicId, t.id).where(sql`voided_at is not null`),
    index('measurements_upload_idx').using('brin', t.uploadId),
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

// ---- SPC runs, frozen limits, alarms and e-mail ----

export const spcRunStatusEnum = pgEnum('spc_run_status', ['queued', 'running', 'succeeded', 'failed']);
export const spcRunKindEnum = pgEnum('spc_run_kind', ['full', 'incremental']);
export const alarmStatusEnum = pgEnum('alarm_status', ['open', 'acknowledged', 'closed']);
export const mailStatusEnum = pgEnum('mail_status', ['pending', 'sent']);

/**
 * Control limits a quality manager froze from a baseline window (phase II). Revisions are kept: a new
 * freeze supersedes the one in force, which stays for the record.
 */
export const controlLimitRevisions = pgTable(
  'control_limit_revisions',
  {
    id: serial('id').primaryKey(),
    characteristicId: integer('characteristic_id').notNull().references(() => characteristics.id),
    revision: integer('revision').notNull(),
    chartType: chartTypeEnum('chart_type').notNull(),
    /** The subgroup size the stored limits are given for; other sizes are rebuilt from centre and sigma within. */
    subgroupSize: integer('subgroup_size').notNull(),
    center: doublePrecision('center').notNull(),
    sigmaWithin: doublePrecision('sigma_within').notNull(),
    locationUcl: doublePrecision('location_ucl').notNull(),
    locationLcl: doublePrecision('location_lcl').notNull(),
    dispersionCenter: doublePrecision('dispersion_center'),
    dispersionUcl: doublePrecision('dispersion_ucl'),
    dispersionLcl: doublePrecision('dispersion_lcl'),
    baselineFrom: timestamp('baseline_from', { withTimezone: true }).notNull(),
    baselineTo: timestamp('baseline_to', { withTimezone: true }).notNull(),
    /** Subgroups kept in the baseline estimate. */
    baselinePoints: integer('baseline_points').notNull(),
    reason: text('reason').notNull(),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    supersededAt: timestamp('superseded_at', { withTimezone: true }),
  },
  (t) => [
    uniqueIndex('control_limit_revisions_revision_key').on(t.characteristicId, t.revision),
    uniqueIndex('control_limit_revisions_in_force_key').on(t.characteristicId).where(sql`superseded_at is null`),
  ],
);

/** A lot's point left out of the limits and run rules of one characteristic (assignable cause found). */
export const pointExclusions = pgTable(
  'point_exclusions',
  {
    id: serial('id').primaryKey(),
    characteristicId: integer('characteristic_id').notNull().references(() => characteristics.id),
    lotId: integer('lot_id').notNull().references(() => lots.id),
    reason: text('reason').notNull(),
    createdBy: integer('created_by').references(() => users.id),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    removedAt: timestamp('removed_at', { withTimezone: true }),
    removedBy: integer('removed_by').references(() => users.id),
    removalReason: text('removal_reason'),
  },
  (t) => [uniqueIndex('point_exclusions_active_key').on(t.characteristicId, t.lotId).where(sql`removed_at is null`)],
);

/** One SPC run: nightly, started by hand, or incremental after an upload or a void. */
export const spcRuns = pgTable(
  'spc_runs',
  {
    id: serial('id').primaryKey(),
    kind: spcRunKindEnum('kind').notNull(),
    /** schedule, manual, upload, void or correction. */
    trigger: text('trigger').notNull(),
    plantId: integer('plant_id').references(() => plants.id),
    /** plant and local date of a nightly run: several schedulers sharing the database start it once. */
    scheduleKey: text('schedule_key').unique(),
    requestedBy: integer('requested_by').references(() => users.id),
    status: spcRunStatusEnum('status').notNull().default('queued'),
    characteristics: integer('characteristics').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp('started_at', { withTimezone: true }),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
  },
  (t) => [index('spc_runs_created_idx').on(t.createdAt)],
);

/** One characteristic of a run: the unit of work of one queue job. */
export const spcRunItems = pgTable(
  'spc_run_items',
  {
    id: serial('id').primaryKey(),
    runId: integer('run_id').notNull().references(() => spcRuns.id),
    characteristicId: integer('characteristic_id').notNull().references(() => characteristics.id),
    status: spcRunStatusEnum('status').notNull().default('queued'),
    jobId: text('job_id'),
    /** host:pid of the worker process of the latest attempt. */
    worker: text('worker'),
    attempts: integer('attempts').notNull().default(0),
    error: text('error'),
    /** False when the inputs were the same as last time and nothing was written. */
    changed: boolean('changed'),
    alarmsRaised: integer('alarms_raised').notNull().default(0),
    alarmsResolved: integer('alarms_resolved').notNull().default(0),
    startedAt: timestamp('started_at', { withTimezone: true }),
    finishedAt: timestamp('finished_at', { withTimezone: true }),
  },
  (t) => [
    uniqueIndex('spc_run_items_run_characteristic_key').on(t.runId, t.characteristicId),
    index('spc_run_items_job_idx').on(t.jobId),
    // The sweep looks only at unfinished items.
    index('spc_run_items_unfinished_idx').on(t.status).where(sql`status in ('queued', 'running')`),
  ],
);

/** The latest computed chart of each characteristic: points in production order, limits, violations, capability. */
export const spcSnapshots = pgTable('spc_snapshots', {
  characteristicId: integer('characteristic_id').primaryKey().references(() => characteristics.id),
  runId: integer('run_id').references(() => spcRuns.id),
  computedAt: timestamp('computed_at', { withTimezone: true }).notNull(),
  /** Hash of every input (live values, exclusions, limit revision, specification): equal means nothing to do. */
  fingerprint: text('fingerprint').notNull(),
  phase: text('phase').notNull(),
  pointCount: integer('point_count').notNull(),
  periodFrom: timestamp('period_from', { withTimezone: true }),
  periodTo: timestamp('period_to', { withTimezone: true }),
  /** Columns of the points, one element per lot in production order. */
  lotIds: integer('lot_ids').array().notNull(),
  location: doublePrecision('location').array().notNull(),
  dispersion: doublePrecision('dispersion').array().notNull(),
  excludedLotIds: integer('excluded_lot_ids').array().notNull(),
  outOfSpecLotIds: integer('out_of_spec_lot_ids').array().notNull(),
  limits: jsonb('limits').notNull(),
  violations: jsonb('violations').notNull(),
  capability: jsonb('capability'),
  reasons: jsonb('reasons').notNull(),
});

/**
 * A signal someone must look at: a run-rule violation or an out-of-specification lot. One row per
 * characteristic, rule, chart and lot, so re-runs never duplicate; a signal the data no longer shows
 * is closed with resolution "data-changed", never deleted.
 */
export const alarms = pgTable(
  'alarms',
  {
    id: serial('id').primaryKey(),
    characteristicId: integer('characteristic_id').notNull().references(() => characteristics.id),
    lotId: integer('lot_id').notNull().references(() => lots.id),
    /** A run rule (we1 … mixture) or out-of-spec. */
    rule: text('rule').notNull(),
    chart: text('chart').notNull(),
    pointIndex: integer('point_index').notNull(),
    /** The plotted statistic (lot mean, range, …) and the lot's values. */
    statistic: doublePrecision('statistic').notNull(),
    values: doublePrecision('values').array().notNull(),
    limitName: text('limit_name'),
    limitValue: doublePrecision('limit_value'),
    description: text('description').notNull(),
    /** The point lies before later points that were already charted (a late result or changed limits). */
    late: boolean('late').notNull().default(false),
    /** Why a late alarm sits at an earlier position: a late result, or recalculated limits. */
    lateReason: text('late_reason'),
    source: text('source').notNull(),
    runId: integer('run_id').references(() => spcRuns.id),
    status: alarmStatusEnum('status').notNull().default('open'),
    /** closed: by-user or data-changed. */
    resolution: text('resolution'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
    acknowledgedAt: timestamp('acknowledged_at', { withTimezone: true }),
    acknowledgedBy: integer('acknowledged_by').references(() => users.id),
    acknowledgeNote: text('acknowledge_note'),
    closedAt: timestamp('closed_at', { withTimezone: true }),
    closedBy: integer('closed_by').references(() => users.id),
    closeNote: text('close_note'),
  },
  (t) => [
    uniqueIndex('alarms_dedupe_key').on(t.characteristicId, t.rule, t.chart, t.lotId),
    index('alarms_status_created_idx').on(t.status, t.createdAt),
  ],
);

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
    kind: text('kind').notNull(),
    userId: integer('user_id').references(() => users.id),
    toAddress: text('to_address').notNull(),
    subject: text('subject').notNull(),
    textBody: text('text_body').notNull(),
    htmlBody: text('html_body').notNull(),
    alarmIds: integer('alarm_ids').array().notNull(),
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
