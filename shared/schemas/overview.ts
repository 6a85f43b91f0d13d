// The overview's periods and answer; free of zod, so the landing page loads without the validation library.
import type { ChartType } from '../spc';

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
}
