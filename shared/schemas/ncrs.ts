// Nonconformance reports (NCR) as the API answers them and the NCR pages read them: states, the
// allowed steps between them, and the answer types. Kept free of zod (requests: ncr-requests.ts).
import type { CauseCategory } from './causes';
import type { LotHoldView, LotStatus } from './lots';

/** open → investigating → actions pending → closed; a closed NCR may be reopened with a reason. */
export const ncrStatuses = ['open', 'investigating', 'actions-pending', 'closed'] as const;
export type NcrStatus = (typeof ncrStatuses)[number];
export const ncrStatusWords: Record<NcrStatus, string> = {
  open: 'Open',
  investigating: 'Investigating',
  'actions-pending': 'Actions pending',
  closed: 'Closed',
};

/**
 * The steps a person may take from each state. Going back from actions pending to investigating (the
 * root cause was wrong) and reopening a closed NCR need a reason.
 */
export const ncrTransitions: Record<NcrStatus, readonly NcrStatus[]> = {
  open: ['investigating'],
  investigating: ['actions-pending'],
  'actions-pending': ['investigating', 'closed'],
  closed: ['open'],
};

/** Steps that must say why. */
export const ncrStepNeedsReason = (from: NcrStatus, to: NcrStatus): boolean =>
  (from === 'closed' && to === 'open') || (from === 'actions-pending' && to === 'investigating');

export const ncrSeverities = ['minor', 'major', 'critical'] as const;
export type NcrSeverity = (typeof ncrSeverities)[number];

export const ncrActionKinds = ['corrective', 'preventive'] as const;
export type NcrActionKind = (typeof ncrActionKinds)[number];

/** What becomes of a lot: released as it is, reworked, sold as a lower product, or scrapped. */
export const lotDispositions = ['release', 'rework', 'downgrade', 'scrap'] as const;
export type LotDisposition = (typeof lotDispositions)[number];
export const lotDispositionWords: Record<LotDisposition, string> = {
  release: 'Release as is',
  rework: 'Rework',
  downgrade: 'Downgrade to another product',
  scrap: 'Scrap',
};

/** Where an NCR was raised from. */
export type NcrRaisedFrom = 'alarms' | 'lot' | 'direct';

export interface UserRef {
  id: number;
  name: string;
}

/** GET /api/v1/ncrs items. */
export interface NcrListItem {
  id: number;
  /** NCR-<year>-<4 digits>. */
  number: string;
  title: string;
  status: NcrStatus;
  severity: NcrSeverity;
  product: { id: number; code: string; name: string } | null;
  assignee: UserRef | null;
  lotNumbers: string[];
  /** Actions not done yet, and those of them past their due date (plant day). */
  openActions: number;
  overdueActions: number;
  createdAt: string;
  createdBy: string | null;
  updatedAt: string;
  closedAt: string | null;
}

/** GET /api/v1/ncrs answer. */
export interface NcrList {
  items: NcrListItem[];
  /** How many NCRs match the filter (items may be fewer: `limit`). */
  total: number;
  counts: Partial<Record<NcrStatus, number>>;
}

/** A lot of an NCR, with its disposition and its standing now. */
export interface NcrLotView {
  lotId: number;
  lotNumber: string;
  productCode: string;
  producedAt: string;
  quantityT: number | null;
  disposition: LotDisposition | null;
  downgradeProduct: { id: number; code: string; name: string } | null;
  dispositionNote: string | null;
  disposedAt: string | null;
  disposedBy: string | null;
  lotStatus: LotStatus;
  /** The lot's open hold, if any (containment). */
  hold: LotHoldView | null;
}

export interface NcrAlarmView {
  id: number;
  characteristicId: number;
  characteristicCode: string;
  characteristicName: string;
  lotNumber: string;
  /** Short name of the signal, and its sentence (shared/spc/alarm-words.ts). */
  signal: string;
  description: string;
  status: string;
  chartUrl: string;
}

export interface NcrActionView {
  id: number;
  kind: NcrActionKind;
  description: string;
  owner: UserRef;
  /** Plant calendar day, YYYY-MM-DD. */
  dueDate: string;
  doneDate: string | null;
  evidence: string | null;
  /** Not done and its due day is before today at the plant. */
  overdue: boolean;
  createdAt: string;
  createdBy: string | null;
}

export interface NcrAttachmentView {
  id: number;
  fileName: string;
  contentType: string;
  sizeBytes: number;
  sha256: string;
  note: string | null;
  createdAt: string;
  createdBy: string | null;
  /** GET address of the bytes (always a download, never shown inline). */
  url: string;
}

/** One step of an NCR's history, oldest first: from the audit trail of the NCR and its parts. */
export interface NcrHistoryEntry {
  at: string;
  actor: string | null;
  /** The audit action ("raise", "transition", "add action", …). */
  action: string;
  /** What happened, in a sentence for people. */
  summary: string;
  reason: string | null;
}

/** GET /api/v1/ncrs/:id, and the answer of every write to an NCR. */
export interface NcrView extends Omit<NcrListItem, 'lotNumbers'> {
  description: string;
  raisedFrom: NcrRaisedFrom;
  rootCauseCategory: CauseCategory | null;
  rootCauseAnalysis: string | null;
  approvedAt: string | null;
  approvedBy: string | null;
  approvalNote: string | null;
  effectivenessCheck: string | null;
  effective: boolean | null;
  closedBy: string | null;
  lots: NcrLotView[];
  alarms: NcrAlarmView[];
  actions: NcrActionView[];
  attachments: NcrAttachmentView[];
  history: NcrHistoryEntry[];
  /** The states this NCR may move to now (ncrTransitions), whatever the reader's role. */
  allowedTransitions: NcrStatus[];
  /** What still stands in the way of closing it, in sentences; empty when it may be closed. */
  closingBlockers: string[];
}

/** GET /api/v1/ncrs/overdue-actions: open actions past due or due within two days, for the overview. */
export interface NcrActionDue {
  ncrId: number;
  ncrNumber: string;
  ncrTitle: string;
  action: NcrActionView;
}
