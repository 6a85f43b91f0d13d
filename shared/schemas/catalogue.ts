import { z } from 'zod';
import { formatScreedDesignation, parseScreedDesignation, screedBinders } from '../lab/en13813';
import { testMethod, testMethodCodes, type RawLoadFormula, type TestMethod, type TestMethodCode } from '../lab/test-methods';
import { CHART_TYPES, type ChartType } from '../spc/charts';
import { RULE_SETS, type RuleSetId } from '../spc/rules';
export type { RuleSetId } from '../spc/rules';
import { specRevisionSchema } from './plant-records';
import type { PlantDateFormat } from '../time';

/** The chart types and run-rule sets are the engine's (shared/spc). */
export const chartTypes = CHART_TYPES;
export const ruleSets = RULE_SETS;

/**
 * Subgroup sizes each chart type takes. An individuals chart plots one reading per lot. The range
 * wastes information above ten values, where the standard deviation serves better (common practice;
 * the engine says so in its reason "r-chart-large-subgroups"). Tables of control chart constants go
 * to n = 25 (ASTM E2587, ISO 7870-2; from memory), which also bounds the replicates of one sample.
 */
export const chartTypeSizes: Record<ChartType, { min: number; max: number }> = {
  imr: { min: 1, max: 1 },
  'xbar-r': { min: 2, max: 10 },
  'xbar-s': { min: 2, max: 25 },
};
export const SUBGROUP_SIZE_MAX = 25;

const chartTypeNames: Record<ChartType, string> = { imr: 'An individuals chart', 'xbar-r': 'An X̄–R chart', 'xbar-s': 'An X̄–S chart' };

/** Why a chart type does not fit a subgroup size, or null when it does. */
export function chartTypeMisfit(chartType: ChartType, subgroupSize: number): string | null {
  const { min, max } = chartTypeSizes[chartType];
  if (subgroupSize >= min && subgroupSize <= max) return null;
  if (chartType === 'imr') return 'An individuals chart takes one reading per lot: set the subgroup size to 1, or choose X̄–R or X̄–S';
  if (subgroupSize < min) return `${chartTypeNames[chartType]} needs at least ${min} readings per lot; with one reading per lot choose the individuals chart`;
  return `${chartTypeNames[chartType]} takes at most ${max} readings per lot; choose the X̄–S chart`;
}

/** The chart a subgroup size usually gets: individuals for one reading, X̄–R for small sets, X̄–S from ten. */
export function suggestedChartType(subgroupSize: number): ChartType {
  if (subgroupSize <= 1) return 'imr';
  return subgroupSize >= 10 ? 'xbar-s' : 'xbar-r';
}

const code = (what: string, example: string) =>
  z
    .string({ message: `Give the ${what} code` })
    .trim()
    .toUpperCase()
    .min(1, `Give the ${what} code`)
    .max(32, 'Keep the code to 32 characters')
    .regex(/^[A-Z0-9][A-Z0-9._-]*$/, `Use letters, digits and . _ - only, e.g. ${example}`);

const name = (what: string) =>
  z
    .string({ message: `Give the ${what} name` })
    .trim()
    .min(2, `Give the ${what} name (at least 2 characters)`)
    .max(120, 'Keep the name under 120 characters');

/** Empty text means "none", stored as null. */
/** A capability threshold (Cpk or Ppk): 1.00 to 3.00, two decimals at most (common practice: 1.33 or 1.67). */
export const capabilityThreshold = z
  .number({ message: 'Enter the threshold as a number, e.g. 1.33' })
  .min(1, 'The threshold is at least 1.00')
  .max(3, 'The threshold is at most 3.00')
  .refine((v) => Math.abs(v * 100 - Math.round(v * 100)) < 1e-9, 'Give the threshold to two decimals at most');

const optionalText = (max: number) =>
  z
    .string()
    .trim()
    .max(max, `Keep it under ${max} characters`)
    .nullable()
    .optional()
    .transform((text) => (text ? text : null));

const active = z.boolean({ message: 'active must be true or false' });

/** A PATCH body: any of the fields, at least one. */
const changesOf = <Shape extends z.ZodRawShape>(shape: Shape, fields: string) =>
  z
    .object(shape)
    .partial()
    .strict()
    .refine((v) => Object.keys(v).length > 0, { message: `Nothing to change: send ${fields}` });

/** POST /api/v1/lines */
export const createLineSchema = z
  .object({
    /** Short code written on lots and in uploads, e.g. "L3"; unique in the plant. */
    code: code('line', 'L3'),
    /** Name in menus and reports, e.g. "Line 3 · renders". */
    name: name('line'),
  })
  .strict();
export type CreateLineInput = z.input<typeof createLineSchema>;

/** PATCH /api/v1/lines/:id — the code only while no lot was made on the line. */
export const updateLineSchema = changesOf(
  {
    ...createLineSchema.shape,
    /** false deactivates: uploads and manual entry refuse new results on it; its lots stay. */
    active,
  },
  'code, name or active',
);
export type UpdateLineInput = z.input<typeof updateLineSchema>;

/**
 * A declared class as printed on the bag. Designations that start with an EN 13813 binder code
 * (CT, CA, MA, AS, SR) are checked against the classes of that standard and written in its usual
 * form ("ct-c25-f6" → "CT-C25-F6"); others (EN 12004 "C2TE S1", EN 1504-3 "R3") are kept as typed.
 */
const declaredClass = optionalText(40).transform((text, ctx) => {
  if (text === null) return null;
  const binder = text.split(/\s*-\s*/)[0].toUpperCase();
  if (!(screedBinders as readonly string[]).includes(binder)) return text;
  const parsed = parseScreedDesignation(text);
  if (!parsed.ok) {
    ctx.addIssue({ code: 'custom', message: `${parsed.error}; write it like CT-C25-F6` });
    return z.NEVER;
  }
  return formatScreedDesignation(parsed.value);
});

const productFields = {
  /** Product code written on lots and in uploads, e.g. "HVL25"; unique in the plant. */
  code: code('product', 'HVL25'),
  /** Trade name, e.g. "HV Level 25". */
  name: name('product'),
  /** Product family as a short word, e.g. "levelling", "tile-adhesive", "repair"; the overview filters by it. */
  family: z
    .string({ message: 'Give the product family' })
    .trim()
    .toLowerCase()
    .min(2, 'Give the product family, e.g. levelling')
    .max(40, 'Keep the family under 40 characters')
    .regex(/^[a-z][a-z0-9-]*$/, 'Write the family as one word of letters, digits and hyphens, e.g. tile-adhesive'),
  /** Declared class, e.g. "CT-C25-F6" (EN 13813) or "C2TE S1" (EN 12004); empty for none. */
  declaredClass,
  /** Code of the production line that makes it. */
  lineCode: code('line', 'L1'),
};

/** POST /api/v1/products — a new product is active. */
export const createProductSchema = z.object(productFields).strict();
export type CreateProductInput = z.input<typeof createProductSchema>;

/** PATCH /api/v1/products/:id — the code only while no lot of it exists. */
export const updateProductSchema = changesOf(
  {
    ...productFields,
    /** false deactivates: uploads and the SPC run leave it out; its records stay. */
    active,
  },
  'code, name, family, declaredClass, lineCode or active',
);
export type UpdateProductInput = z.input<typeof updateProductSchema>;

/** Specimen ages beyond a year are not a routine test of a mortar (common practice). */
export const AGE_DAYS_MAX = 365;

const characteristicFields = {
  /** Code in uploads and on charts, e.g. "HVL25-RC28"; unique in the plant. */
  code: code('characteristic', 'HVL25-RC28'),
  /** Name on charts and reports, e.g. "HV Level 25 · compressive strength · 28 d". */
  name: name('characteristic'),
  /** Code of the product it is tested on. */
  productCode: code('product', 'HVL25'),
  /** Test method from the catalogue; it gives the unit and the possible range of a result. */
  testMethodCode: z.enum(testMethodCodes, { message: 'Choose a test method from the catalogue' }),
  /** Specimen age at test in days for hardened-mortar methods; null for fresh-mortar methods. */
  ageDays: z
    .number({ message: 'Enter the age in whole days' })
    .int('Enter the age in whole days')
    .min(1, 'The age is at least 1 day')
    .max(AGE_DAYS_MAX, `The age is at most ${AGE_DAYS_MAX} days`)
    .nullable(),
  /** Readings of one lot's sample, charted as one subgroup: 1 to 25. */
  subgroupSize: z
    .number({ message: 'Enter the subgroup size' })
    .int('The subgroup size is a whole number')
    .min(1, 'The subgroup size is at least 1')
    .max(SUBGROUP_SIZE_MAX, `The subgroup size is at most ${SUBGROUP_SIZE_MAX}`),
  /** Control chart: imr (one reading per lot), xbar-r (2 to 10), xbar-s (2 to 25). */
  chartType: z.enum(chartTypes, { message: 'Choose X̄–R, X̄–S or individuals' }),
  /** Run rules the SPC run applies. */
  ruleSet: z.enum(ruleSets, { message: 'Choose the Western Electric rules or the extended set' }),
  /** How and how often the lab samples, in a sentence; empty for none. */
  samplingPlan: optionalText(500),
  /** The capability index below which the nightly run raises a falling-capability alarm; null: the plant's. */
  capabilityThreshold: capabilityThreshold.nullable().optional(),
};

export interface CharacteristicRuleInput {
  testMethodCode: TestMethodCode;
  ageDays: number | null;
  subgroupSize: number;
  chartType: ChartType;
}

/**
 * The rules between fields, as issues with the field they concern: a fresh-mortar test has no
 * age and a hardened one has one; the chart type fits the subgroup size. The API runs them again on
 * the stored characteristic merged with a change.
 */
export function characteristicIssues(c: CharacteristicRuleInput): { path: keyof CharacteristicRuleInput; message: string }[] {
  const issues: { path: keyof CharacteristicRuleInput; message: string }[] = [];
  const method = testMethod(c.testMethodCode);
  if (method.state === 'fresh' && c.ageDays !== null) {
    issues.push({ path: 'ageDays', message: `${method.name} is a fresh-mortar test: leave the age empty` });
  }
  if (method.state === 'hardened' && c.ageDays === null) {
    issues.push({ path: 'ageDays', message: `${method.name} is tested on hardened specimens: give their age in days, e.g. 28` });
  }
  const misfit = chartTypeMisfit(c.chartType, c.subgroupSize);
  if (misfit) issues.push({ path: 'chartType', message: misfit });
  return issues;
}

function addCharacteristicIssues(c: CharacteristicRuleInput, ctx: z.RefinementCtx): void {
  for (const issue of characteristicIssues(c)) ctx.addIssue({ code: 'custom', path: [issue.path], message: issue.message });
}

/** The settings of a characteristic with the rules between them: the admin's edit form. */
export const characteristicSettingsSchema = z.object(characteristicFields).strict().superRefine(addCharacteristicIssues);
export type CharacteristicSettings = z.output<typeof characteristicSettingsSchema>;

/** POST /api/v1/characteristics — the unit comes from the test method. */
export const createCharacteristicSchema = z
  .object({
    ...characteristicFields,
    /** The first specification revision, saved with the characteristic; leave out to add it later. */
    spec: specRevisionSchema.optional(),
  })
  .strict()
  .superRefine(addCharacteristicIssues);
export type CreateCharacteristicInput = z.input<typeof createCharacteristicSchema>;

/**
 * PATCH /api/v1/characteristics/:id. Once results are recorded, the code, product, test method and
 * age stay, and the subgroup size cannot drop below the replicates already stored.
 */
export const updateCharacteristicSchema = changesOf(
  {
    ...characteristicFields,
    /** false deactivates: uploads and the SPC run leave it out; its results and charts stay. */
    active,
  },
  'a setting or active',
);
export type UpdateCharacteristicInput = z.input<typeof updateCharacteristicSchema>;

// What the catalogue endpoints answer: every signed-in role gets the same fields.

/** GET /api/v1/plants items. */
export interface PlantView {
  id: number;
  code: string;
  name: string;
  /** IANA zone: production and test times are typed and shown in it. */
  timeZone: string;
  /** When the nightly SPC run starts, as a cron expression in the plant's time zone. */
  nightlyRunCron: string;
  /** How dates are typed and shown at the plant, e.g. "dd/MM/yyyy". */
  dateFormat: PlantDateFormat;
  /** The capability index below which the nightly run raises a falling-capability alarm, unless a characteristic sets its own. */
  capabilityThreshold: number;
}

/** GET /api/v1/lines items, and the answer of adding or changing a line. */
export interface LineView {
  id: number;
  code: string;
  name: string;
  /** false: deactivated, takes no new results. */
  active: boolean;
  /** Lots were made on it: its code is fixed. */
  hasLots: boolean;
}

/** GET /api/v1/products items, and the answer of adding or changing a product. */
export interface ProductView {
  id: number;
  code: string;
  name: string;
  family: string;
  declaredClass: string | null;
  active: boolean;
  lineCode: string | null;
  lineName: string | null;
  /** Lots of it are recorded: its code is fixed. */
  hasLots: boolean;
}

/** The specification revision in force now. */
export interface SpecInForce {
  revision: number;
  lsl: number | null;
  usl: number | null;
  target: number | null;
  effectiveFrom: string;
}

/** GET /api/v1/characteristics items, and the answer of adding or changing a characteristic. */
export interface CharacteristicView {
  id: number;
  code: string;
  name: string;
  unit: string;
  /** Specimen age at test in days; null for fresh-mortar tests. */
  ageDays: number | null;
  subgroupSize: number;
  chartType: ChartType;
  ruleSet: RuleSetId;
  samplingPlan: string | null;
  /** The characteristic's own capability threshold; null: the plant's applies. */
  capabilityThreshold: number | null;
  active: boolean;
  productId: number;
  productCode: string;
  productName: string;
  productFamily: string;
  lineCode: string | null;
  testMethodCode: TestMethodCode;
  testMethodName: string;
  standard: string;
  rawLoad: RawLoadFormula | null;
  decimals: number;
  spec: SpecInForce | null;
  /** Results were ever recorded under it (voided ones too): its code, product, method and age are fixed. */
  hasResults: boolean;
}

/** GET /api/v1/test-methods items: the cautions already written out, ending with the deferral line. */
export type TestMethodView = Omit<TestMethod, 'cautions'> & { cautions: string[] };
