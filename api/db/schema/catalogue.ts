// What the plant makes and how it is tested: plants, lines, products, test methods, characteristics, specifications, process events.
import { boolean, doublePrecision, index, integer, pgEnum, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { users } from './users';
import type { RawLoadFormula } from '../../../shared/lab/test-methods';
import type { PlantDateFormat } from '../../../shared/time';

export const chartTypeEnum = pgEnum('chart_type', ['xbar-r', 'xbar-s', 'imr']);
export const ruleSetEnum = pgEnum('rule_set', ['we', 'extended']);

export const plants = pgTable('plants', {
  id: serial('id').primaryKey(),
  code: text('code').notNull().unique(),
  name: text('name').notNull(),
  /** IANA zone: local dates in uploads and the nightly run's clock are read in it. */
  timeZone: text('time_zone').notNull(),
  /** node-cron expression of the nightly SPC run in the plant's time zone. */
  nightlyRunCron: text('nightly_run_cron').notNull().default('0 2 * * *'),
  /** How people type and read dates at this plant (date-fns tokens, one of PLANT_DATE_FORMATS). */
  dateFormat: text('date_format').$type<PlantDateFormat>().notNull().default('dd/MM/yyyy'),
  /** Falling-capability alarm below this Cpk (Ppk where the chart is not in control), unless the characteristic sets its own. */
  capabilityThreshold: doublePrecision('capability_threshold').notNull().default(1.33),
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
  rawLoad: text('raw_load').$type<RawLoadFormula>(),
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
  /** Its own falling-capability threshold; null: the plant's. */
  capabilityThreshold: doublePrecision('capability_threshold'),
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
