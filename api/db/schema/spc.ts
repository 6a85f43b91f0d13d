// SPC runs and their outcome: frozen limits, exclusions, runs, snapshots, alarms.
import { sql } from 'drizzle-orm';
import { boolean, doublePrecision, index, integer, jsonb, pgEnum, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { users } from './users';
import { chartTypeEnum, characteristics, plants } from './catalogue';
import { lots } from './results';

export const spcRunStatusEnum = pgEnum('spc_run_status', ['queued', 'running', 'succeeded', 'failed']);
export const spcRunKindEnum = pgEnum('spc_run_kind', ['full', 'incremental']);
export const alarmStatusEnum = pgEnum('alarm_status', ['open', 'acknowledged', 'investigating', 'closed']);

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

/** One investigation several alarms belong to: "five alarms on three characteristics after one raw-material delivery". */
export const alarmGroups = pgTable('alarm_groups', {
  id: serial('id').primaryKey(),
  title: text('title').notNull(),
  note: text('note'),
  createdBy: integer('created_by').references(() => users.id),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
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
    /**
     * When the signal was detected: the run's (or the import's) time. The demo history carries the
     * time of the plant's nightly run after the lot's result, as if the plant had run all along.
     */
    detectedAt: timestamp('detected_at', { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
    acknowledgedAt: timestamp('acknowledged_at', { withTimezone: true }),
    acknowledgedBy: integer('acknowledged_by').references(() => users.id),
    acknowledgeNote: text('acknowledge_note'),
    closedAt: timestamp('closed_at', { withTimezone: true }),
    closedBy: integer('closed_by').references(() => users.id),
    closeNote: text('close_note'),
    /** How a person closed it: assignable-cause, no-cause or false-alarm (shared/schemas/alarms.ts alarmOutcomes). */
    outcome: text('outcome'),
    /** With an assignable cause: material, method, machine, people, measurement or environment; close_note holds the free text. */
    causeCategory: text('cause_category'),
    /** Who follows the alarm up. */
    assigneeId: integer('assignee_id').references(() => users.id),
    /** The investigation it belongs to, with other alarms of one cause. */
    groupId: integer('group_id').references(() => alarmGroups.id),
    investigatingAt: timestamp('investigating_at', { withTimezone: true }),
    investigatingBy: integer('investigating_by').references(() => users.id),
    /** The last time a person opened a closed alarm again, and why. */
    reopenedAt: timestamp('reopened_at', { withTimezone: true }),
    reopenedBy: integer('reopened_by').references(() => users.id),
    reopenReason: text('reopen_reason'),
  },
  (t) => [
    index('alarms_assignee_idx').on(t.assigneeId),
    index('alarms_group_idx').on(t.groupId),
    uniqueIndex('alarms_dedupe_key').on(t.characteristicId, t.rule, t.chart, t.lotId),
    index('alarms_status_created_idx').on(t.status, t.createdAt),
    index('alarms_detected_idx').on(t.detectedAt),
    index('alarms_run_idx').on(t.runId),
  ],
);

/** A comment on an alarm, in order. */
export const alarmComments = pgTable(
  'alarm_comments',
  {
    id: serial('id').primaryKey(),
    alarmId: integer('alarm_id').notNull().references(() => alarms.id),
    authorId: integer('author_id').notNull().references(() => users.id),
    body: text('body').notNull(),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index('alarm_comments_alarm_idx').on(t.alarmId, t.createdAt)],
);

/**
 * Whether a characteristic's capability index is below its threshold now, so a falling-capability
 * alarm is raised once per crossing (below after being at or above), not at every run.
 */
export const capabilityWatch = pgTable('capability_watch', {
  characteristicId: integer('characteristic_id').primaryKey().references(() => characteristics.id),
  below: boolean('below').notNull(),
  /** The index compared (Cpk, or Ppk where the chart is not in control) and its value at the last run. */
  indexName: text('index_name').notNull(),
  indexValue: doublePrecision('index_value'),
  threshold: doublePrecision('threshold').notNull(),
  /** When it last crossed (either way), and the alarm raised at the latest downward crossing. */
  changedAt: timestamp('changed_at', { withTimezone: true }).notNull().defaultNow(),
  alarmId: integer('alarm_id').references(() => alarms.id),
});
