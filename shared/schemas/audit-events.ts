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

/** Who did what an audit event records: a user as they stand now (name and role), or null for the system itself. */
export interface AuditActor {
  id: number;
  name: string;
  role: string;
}

/** One event of GET /api/v1/audit-events. */
export interface AuditEventView {
  /** The event's place in the chain: the list's order and its cursor. */
  seq: number;
  id: number;
  /** When it happened (ISO, UTC); shown in the plant's zone. */
  at: string;
  /** Null: the system did it by itself (an automatic hold, an alarm closed because its signal went). */
  actor: AuditActor | null;
  entity: string;
  entityId: string | null;
  action: string;
  /** What happened in one sentence of the trade's words. */
  sentence: string;
  before: unknown;
  after: unknown;
  reason: string | null;
  /** The web page of what the event is about (a lot, an NCR, an alarm, a chart, the uploads), when there is one. */
  link: string | null;
}

/** GET /api/v1/audit-events: newest first; `nextCursor` is the `after` of the next page, null on the last one. */
export interface AuditEventPage {
  items: AuditEventView[];
  nextCursor: number | null;
}

/** GET /api/v1/audit-events/facets: what the trail holds, for the filter pick lists. */
export interface AuditFacets {
  /** Each entity present, with the actions recorded for it. */
  entities: { entity: string; actions: string[] }[];
  /** Each user who did something recorded, and whether the system did. */
  actors: AuditActor[];
  systemActs: boolean;
  /** The oldest and newest events (ISO), for the period fields' hints; null when the trail is empty. */
  first: string | null;
  last: string | null;
}
