// The overview's periods and answer; free of zod, so the landing page loads without the validation library.
import type { HoldSource } from './lots';
import type { ChartType } from '../spc';

/** Common practice: Cpk of at least 1.33 for a capable process, below 1.00 not capable. */
export const CPK_CAPABLE = 1.33;
export const CPK_MINIMUM = 1.0;

/**
 * An index compared with a limit, to as many decimals as show that it is below it: 1.3271 against
 * 1.33 reads "1.327", never "1.33 is below 1.33".
 */
export function indexBelow(value: number, limit: number): string {
  for (let places = 2; places <= 6; places++) {
    const text = value.toFixed(places);
    if (Number(text) < limit) return text;
  }
  // Closer than rounding to six places shows: cut off, not rounded up to the limit.
  return (Math.floor(value * 1e6) / 1e6).toFixed(6);
}

/** Cpk as the card prints it: two decimals, more where two would round it up to a limit it is below. */
export function cpkFigure(cpk: number): string {
  if (cpk < CPK_MINIMUM) return indexBelow(cpk, CPK_MINIMUM);
  if (cpk < CPK_CAPABLE) return indexBelow(cpk, CPK_CAPABLE);
  return cpk.toFixed(2);
}

/** The periods the overview offers, in days back from now. */
export const overviewPeriods = [7, 30, 90, 182] as const;

/** 'alarms-open': no signal in the period, but alarms of the nightly run are still open, so not "in control". */
export type ControlState = 'in-control' | 'signal' | 'alarms-open' | 'not-enough-data';

/** One characteristic on the overview. */
export interface OverviewItem {
  id: number;
  code: string;
  name: string;
  unit: string;
  decimals: number;
  chartType: ChartType;
  productCode: string;
  productName: string;
  productFamily: string;
  lineCode: string | null;
  lineName: string | null;
  spec: { lsl: number | null; usl: number | null; target: number | null } | null;
  latest: { lotNumber: string; producedAt: string; location: number; n: number; outOfSpec: boolean } | null;
  controlState: ControlState;
  /** Rule signals among the period's points (not excluded). */
  signals: number;
  /** Points of the period outside the specification. */
  outOfSpecCount: number;
  pointsInPeriod: number;
  /** Alarms of the nightly run still open (not acknowledged or closed). */
  openAlarms: number;
  limitsSource: 'trial' | 'frozen' | null;
  /** Cpk of the period, unrounded; null without a specification or with too few lots (capabilityEnough). */
  cpk: number | null;
  cpkCi95: [number, number] | null;
  capabilityPreliminary: boolean;
  /** Whether the period has lots enough for capability at all; when not, the card says so. */
  capabilityEnough: boolean;
  /** The period's points (oldest first, in at most TREND_POINTS groups) for the trend line, with their flags. */
  trend: { location: number; signal: boolean; outOfSpec: boolean }[];
  /** Why the item needs attention, in plain words; empty when it does not. */
  attention: string[];
  /** Higher needs attention sooner. */
  attentionScore: number;
}

/** GET /api/v1/overview */
export interface Overview {
  generatedAt: string;
  days: number;
  from: string;
  lines: { code: string; name: string }[];
  families: string[];
  items: OverviewItem[];
  /** Lots on hold now (of the line and family chosen): how many, and the first of them, oldest hold first. */
  heldLots: { count: number; items: HeldLot[] };
}

/** A lot on hold, as the overview lists it. */
export interface HeldLot {
  lotNumber: string;
  productCode: string;
  lineCode: string;
  reason: string;
  source: HoldSource;
  /** ISO 8601 instant the hold was placed. */
  heldSince: string;
}

/** Held lots the overview lists at most; the lot list shows them all. */
export const OVERVIEW_HELD_LOTS = 10;
