// The audit trail's answers.

/** Why a link of the audit chain does not hold. */
export type AuditChainProblem =
  /** The row's content (or its place) no longer gives its stored hash: it was changed after it was written. */
  | 'content-changed'
  /** The row does not name the hash of the row before it. */
  | 'link-broken'
  /** A place in the chain is empty: a row was deleted. */
  | 'event-missing'
  /** A committed row without a place in the chain: written past the sealing trigger. */
  | 'unsealed';

/** GET /api/v1/audit-events/verify */
export interface AuditChainVerdict {
  /** True when every link holds. */
  intact: boolean;
  /** Rows checked. */
  events: number;
  /** The newest link: write its hash down (the audit pack's manifest does) to detect a later rewrite of the whole chain. */
  head: { seq: number; eventId: number; hash: string; at: string } | null;
  /** The first link that does not hold, in chain order; null when intact. */
  firstBroken: { seq: number | null; eventId: number | null; problem: AuditChainProblem; message: string } | null;
  /** When the check ran (ISO). */
  checkedAt: string;
}
