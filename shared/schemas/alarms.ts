// The alarm as the API answers it and the alarms page reads it. Kept free of zod.
import type { RuleId } from '../spc';

import type { CauseCategory } from './causes';
import type { LotStatus } from './lots';

/** open → acknowledged → investigating → closed; a person may open a closed alarm again with a reason. */
export const alarmStatuses = ['open', 'acknowledged', 'investigating', 'closed'] as const;
export type AlarmStatus = (typeof alarmStatuses)[number];
export const alarmStatusWords: Record<AlarmStatus, string> = { open: 'Open', acknowledged: 'Acknowledged', investigating: 'Investigating', closed: 'Closed' };

/**
 * The steps a person may take from each status: forward one step, or close at once (a false alarm is
 * seen at a glance); a closed alarm only opens again, with a reason. The API refuses any other step
 * with 409 naming these, and the alarm page offers exactly these buttons.
 */
export const alarmSteps: Record<AlarmStatus, readonly AlarmStatus[]> = {
  open: ['acknowledged', 'closed'],
  acknowledged: ['investigating', 'closed'],
  investigating: ['closed'],
  closed: ['open'],
};
/** The button of a step: what the person does. */
export const alarmStepWords: Record<AlarmStatus, string> = { open: 'Reopen', acknowledged: 'Acknowledge', investigating: 'Investigate', closed: 'Close' };

/** How a person closed an alarm: an assignable cause was found (with its category), none was, or the signal was false. */
export const alarmOutcomes = ['assignable-cause', 'no-cause', 'false-alarm'] as const;
export type AlarmOutcome = (typeof alarmOutcomes)[number];
export const alarmOutcomeWords: Record<AlarmOutcome, string> = {
  'assignable-cause': 'Assignable cause found',
  'no-cause': 'No cause found',
  'false-alarm': 'False alarm',
};
export type { CauseCategory };

/**
 * A run rule, a result outside the specification in force when the lot was produced, or the
 * capability index falling below the characteristic's threshold (raised at the newest lot of the run).
 */
export type AlarmRule = RuleId | 'out-of-spec' | 'capability';
/** The chart the signal is on: the lot means or values (location), or their ranges or deviations (dispersion). */
export type AlarmChart = 'location' | 'dispersion';
/** 'run': raised by an SPC run; 'ingest': an out-of-specification result, raised as soon as it was stored. */
export type AlarmSource = 'run' | 'ingest';
/** How a closed alarm was closed: by a person with a note, or because the data no longer show the signal. */
export type AlarmResolution = 'by-user' | 'data-changed';

/** What a run rule or the specification found at one point of a chart: the facts an alarm is raised from. */
export interface AlarmSignal {
  rule: AlarmRule;
  chart: AlarmChart;
  /** Position of the lot on the chart, from 0. */
  pointIndex: number;
  /** The plotted statistic (lot mean, range, …) and the lot's values. */
  statistic: number;
  values: number[];
  limitName: string | null;
  limitValue: number | null;
  description: string;
  /** Set when the point lies before the newest point charted last time: a late result, or changed limits. */
  lateReason: string | null;
}

/** GET /api/v1/alarms items, GET /api/v1/alarms/:id, and the answer of acknowledging or closing one. */
export interface AlarmView extends AlarmSignal {
  id: number;
  characteristic: { id: number; code: string; name: string; unit: string; decimals: number; productCode: string; lineCode: string | null };
  lot: { id: number; lotNumber: string; producedAt: string };
  /** Short name of the signal in the trade's words. */
  signal: string;
  /** The plotted figure in words and with the characteristic's decimals: "subgroup mean", "1,501 kg/m³". */
  figure: { name: string; text: string };
  /** The limit of the same chart the figure is on: "upper control limit", "1,490 kg/m³". */
  limit: { name: string; text: string } | null;
  ruleDescription: string | null;
  /** The point lies before later points that were already charted. */
  late: boolean;
  source: AlarmSource;
  runId: number | null;
  status: AlarmStatus;
  resolution: AlarmResolution | null;
  createdAt: string;
  /** When the signal was detected: the run's time; the demo history's nightly run after the lot. */
  detectedAt: string;
  updatedAt: string;
  acknowledgedAt: string | null;
  acknowledgedBy: string | null;
  acknowledgeNote: string | null;
  closedAt: string | null;
  closedBy: string | null;
  closeNote: string | null;
  /** How a person closed it, and the cause category with an assignable cause. */
  outcome: AlarmOutcome | null;
  causeCategory: CauseCategory | null;
  investigatingAt: string | null;
  investigatingBy: string | null;
  reopenedAt: string | null;
  reopenedBy: string | null;
  reopenReason: string | null;
  assignee: { id: number; name: string } | null;
  group: { id: number; title: string } | null;
  /** Address of the chart at the lot (`?lot=`), as the e-mails link it. */
  chartUrl: string;
}

/** One comment on an alarm. */
export interface AlarmComment {
  id: number;
  author: string;
  body: string;
  createdAt: string;
}

/** One entry of an alarm's history, from the audit trail. */
export interface AlarmHistoryEntry {
  at: string;
  /** Who did it; null for the SPC run. */
  actor: string | null;
  action: string;
  reason: string | null;
  before: unknown;
  after: unknown;
}

/** An investigation several alarms belong to, with its members. */
export interface AlarmGroupView {
  id: number;
  title: string;
  note: string | null;
  createdBy: string | null;
  createdAt: string;
  members: { id: number; characteristicCode: string; lotNumber: string; signal: string; status: AlarmStatus }[];
}

/** GET /api/v1/alarms/:id: the alarm with everything about its follow-up. */
export interface AlarmDetail extends AlarmView {
  comments: AlarmComment[];
  group: AlarmGroupView | null;
  history: AlarmHistoryEntry[];
  ncrs: { id: number; number: string; status: string }[];
  /** The lot's status now (released, on hold, rejected). */
  lotStatus: LotStatus;
  /** The steps a person may take now (alarmSteps of its status). */
  nextSteps: readonly AlarmStatus[];
}

/** POST /api/v1/alarms/acknowledge: which alarms were acknowledged, and which were not open. */
export interface BulkAcknowledgeResult {
  acknowledged: number[];
  skipped: number[];
}

/** GET /api/v1/alarms: the alarms of the filter in the order of what matters this morning, and the count of every status. */
export interface AlarmList {
  items: AlarmView[];
  counts: Partial<Record<AlarmStatus, number>>;
}
