// Requests of the chart and overview endpoints, shared by the API routes and the web forms that post
// them, and the JSON shapes the endpoints answer with.
import { z } from 'zod';
import type { CapabilityResult, ChartPart, ChartType, RuleId } from '../spc';

const reason = z
  .string({ message: 'Give a reason' })
  .trim()
  .min(3, 'Give a reason of at least 3 characters')
  .max(500, 'Keep the reason under 500 characters');

/** A date or an ISO 8601 date and time. */
export const instant = () => z.coerce.date({ message: 'Enter a valid date' });

/** POST /api/v1/characteristics/:id/exclusions — leave one lot's point out of the limit calculation. */
export const excludePointSchema = z.object({
  /** The lot whose point is excluded. */
  lotId: z.coerce.number({ message: 'Choose a point' }).int('Choose a point').positive('Choose a point'),
  /** The assignable cause found, in plain words. */
  reason,
});
export type ExcludePointInput = z.infer<typeof excludePointSchema>;

/** DELETE /api/v1/characteristics/:id/exclusions/:lotId — take a point back into the calculation. */
export const includePointSchema = z.object({
  /** Why the exclusion no longer holds. */
  reason,
});
export type IncludePointInput = z.infer<typeof includePointSchema>;

/** POST /api/v1/characteristics/:id/limit-revisions — freeze limits from a baseline period. */
export const freezeLimitsSchema = z
  .object({
    /** First production time of the baseline period. */
    baselineFrom: instant(),
    /** Last production time of the baseline period (inclusive). */
    baselineTo: instant(),
    /** Why the limits are frozen now, e.g. "Process stable after the new sand source". */
    reason,
  })
  .refine((v) => v.baselineFrom.getTime() < v.baselineTo.getTime(), { path: ['baselineTo'], message: 'The baseline must end after it starts' });
export type FreezeLimitsInput = z.input<typeof freezeLimitsSchema>;

// ---------------------------------------------------------------------------------------------
// Answers
// ---------------------------------------------------------------------------------------------

export interface ChartLimitLines {
  center: number | null;
  ucl: number | null;
  lcl: number | null;
}

/** The control limits a chart is judged against: trial (phase I, from the data shown) or frozen. */
export interface ChartLimits {
  source: 'trial' | 'frozen';
  revisionId: number | null;
  baselineFrom: string | null;
  baselineTo: string | null;
  frozenAt: string | null;
  frozenBy: string | null;
  reason: string | null;
  location: ChartLimitLines & { sigma: number | null };
  dispersion: ChartLimitLines;
  zones: { plus1: number; plus2: number; minus1: number; minus2: number } | null;
  sigmaWithin: number | null;
  sigmaOverall: number | null;
}

/** One plotted point: one lot's subgroup of replicate results. */
export interface ChartPointRecord {
  index: number;
  lotId: number;
  lotNumber: string;
  producedAt: string;
  shift: string | null;
  n: number;
  values: number[];
  location: number;
  dispersion: number | null;
  /** The centre line this point is judged against: it moves where a limit revision takes over. */
  center: number | null;
  ucl: number | null;
  lcl: number | null;
  dispersionUcl: number | null;
  dispersionLcl: number | null;
  excluded: boolean;
  exclusionReason: string | null;
  outOfSpec: boolean;
  rules: RuleId[];
}

export interface ChartViolation {
  rule: RuleId;
  chart: ChartPart;
  index: number;
  points: number[];
  description: string;
}

export interface ChartProcessEvent {
  id: number;
  occurredAt: string;
  title: string;
  description: string | null;
}

/**
 * The periods a chart offers: since the limits in force apply (the default), the last 30, 90 or 182
 * plant days, or all history.
 */
export const chartPeriods = ['limits', '30', '90', '182', 'all'] as const;
export type ChartPeriod = (typeof chartPeriods)[number];

/** The production-time window a chart answer covers, and why. */
export interface ChartWindowView {
  /** The period charted; 'custom' for a window given by from and to. */
  period: ChartPeriod | 'custom';
  from: string | null;
  to: string | null;
  /** Where the frozen limits in force start to apply (their baseline's start); null under trial limits. */
  limitsFrom: string | null;
}

/** GET /api/v1/characteristics/:id/chart */
export interface CharacteristicChart {
  window: ChartWindowView;
  characteristic: {
    id: number;
    code: string;
    name: string;
    unit: string;
    chartType: ChartType;
    ruleSet: 'we' | 'extended';
    subgroupSize: number;
    productCode: string;
    productName: string;
    lineCode: string | null;
    decimals: number;
  };
  spec: { lsl: number | null; usl: number | null; target: number | null; revision: number } | null;
  limits: ChartLimits;
  points: ChartPointRecord[];
  violations: ChartViolation[];
  events: ChartProcessEvent[];
  capability: CapabilityResult | null;
  reasons: string[];
}

/** One frozen-limits revision, newest first in GET /api/v1/characteristics/:id/limit-revisions. */
export interface LimitRevisionRecord {
  id: number;
  revision: number;
  chartType: ChartType;
  /** The subgroup size the stored limits are given for. */
  subgroupSize: number;
  center: number;
  sigmaWithin: number;
  locationUcl: number;
  locationLcl: number;
  dispersionCenter: number | null;
  dispersionUcl: number | null;
  dispersionLcl: number | null;
  baselineFrom: string;
  baselineTo: string;
  /** Subgroups kept in the baseline estimate. */
  baselinePoints: number;
  reason: string;
  createdByName: string | null;
  createdAt: string;
  /** When a later freeze replaced it; null for the revision in force. */
  supersededAt: string | null;
}
