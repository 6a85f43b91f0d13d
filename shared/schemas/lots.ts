import { z } from 'zod';
import { noteText } from './fields';
import type { LotDisposition, NcrStatus } from './ncrs';

/** GET /api/v1/lots items: a lot as produced, newest first (a lot number typed in full first). */
export interface LotListItem {
  id: number;
  lotNumber: string;
  /** ISO 8601 instant. */
  producedAt: string;
  shift: string | null;
  productCode: string;
  lineCode: string;
  status: LotStatus;
  /** The open hold's reason and since when (ISO 8601), when the lot is on hold. */
  holdReason: string | null;
  heldSince: string | null;
}

/** GET /api/v1/lots answer: `more` says whether lots follow beyond this page. */
export interface LotList {
  items: LotListItem[];
  more: boolean;
}

/**
 * A lot's standing for dispatch: released (free to ship), on hold (an open hold: out of specification,
 * put on hold by a person, or contained by an NCR), rejected (an NCR's disposition scrapped it).
 */
export const lotStatuses = ['released', 'on-hold', 'rejected'] as const;
export type LotStatus = (typeof lotStatuses)[number];
export const lotStatusWords: Record<LotStatus, string> = { released: 'Released', 'on-hold': 'On hold', rejected: 'Rejected' };

/** Who put a lot on hold: the system for a result out of specification, a person, or an NCR's containment. */
export const holdSources = ['out-of-spec', 'manual', 'ncr'] as const;
export type HoldSource = (typeof holdSources)[number];
export const holdSourceWords: Record<HoldSource, string> = { 'out-of-spec': 'Result out of specification', manual: 'Put on hold by hand', ncr: 'NCR containment' };

/** One hold of a lot, open or released. */
export interface LotHoldView {
  id: number;
  source: HoldSource;
  reason: string;
  alarmId: number | null;
  ncr: { id: number; number: string } | null;
  /** null: the system. */
  placedBy: string | null;
  placedAt: string;
  releasedAt: string | null;
  releasedBy: string | null;
  releaseReason: string | null;
}

/** A hold as the lot page shows it: whether the alarm that caused it was withdrawn since (a corrected or voided result). */
export interface LotHoldEntry extends LotHoldView {
  /** The out-of-spec alarm behind an automatic hold no longer holds: its result was corrected or voided. The hold stays until released. */
  causeWithdrawn: boolean;
}

/** An NCR that concerns the lot, with the decision on this lot. */
export interface LotNcrView {
  id: number;
  number: string;
  title: string;
  status: NcrStatus;
  disposition: LotDisposition | null;
}

/** A stored result of the lot. */
export interface LotResultView {
  id: number;
  characteristicCode: string;
  characteristicName: string;
  unit: string;
  replicate: number;
  value: number;
  testedAt: string | null;
  operator: string | null;
  note: string | null;
  source: 'upload' | 'manual';
  uploadId: number | null;
  uploadFile: string | null;
}

/** GET /api/v1/lots/:lotNumber (and the answer of hold and release): the lot, its results, standing, holds and NCRs. */
export interface LotView {
  id: number;
  lotNumber: string;
  producedAt: string;
  shift: string | null;
  productCode: string;
  productName: string;
  lineCode: string;
  status: LotStatus;
  results: LotResultView[];
  /** Per characteristic code, the specification revision in force when the lot was produced. */
  specs: Record<string, { revision: number; lsl: number | null; usl: number | null; target: number | null; effectiveFrom: string }>;
  /** Newest first. */
  holds: LotHoldEntry[];
  ncrs: LotNcrView[];
}

/** POST /api/v1/lots/:lotNumber/hold and /release body. */
export const lotHoldRequestSchema = z.object({
  /** Why the lot is held back or let go, for the audit trail and the e-mail. */
  reason: noteText('a reason', { min: 5, max: 1000 }),
});
export type LotHoldRequest = z.infer<typeof lotHoldRequestSchema>;
