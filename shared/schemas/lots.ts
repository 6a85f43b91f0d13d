/** GET /api/v1/lots items: a lot as produced, newest first (a lot number typed in full first). */
export interface LotListItem {
  id: number;
  lotNumber: string;
  /** ISO 8601 instant. */
  producedAt: string;
  shift: string | null;
  productCode: string;
  lineCode: string;
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
