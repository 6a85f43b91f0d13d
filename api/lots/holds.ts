// Lot holds: the one way a lot is put on hold or released, by a person, by the system (a result out of
// specification) or by an NCR, each an audit event in the caller's transaction. A lot's status is
// derived, never stored: lotStatusSql is the rule every query uses.
import { sql, type SQL } from 'drizzle-orm';
import type { HoldSource, LotHoldEntry, LotStatus } from '@shared/schemas/lots';
import type { Json } from '@api/http/json';
import { recordAudit } from '../db/audit';
import { HttpError } from '../http/errors';
import { arr, type Executor } from '../spc/db';

/**
 * A lot's status from its holds and its NCR dispositions: rejected when an NCR scrapped it, on hold
 * while a hold is open (rework keeps it so), released otherwise. `lotId` is an SQL expression.
 */
export const lotStatusSql = (lotId: SQL): SQL<LotStatus> => sql<LotStatus>`(case
  when exists (select 1 from ncr_lots nl where nl.lot_id = ${lotId} and nl.disposition = 'scrap') then 'rejected'
  when exists (select 1 from lot_holds h where h.lot_id = ${lotId} and h.released_at is null) then 'on-hold'
  else 'released' end)`;

export interface HoldRequest {
  lotId: number;
  lotNumber: string;
  source: HoldSource;
  reason: string;
  /** null: the system. */
  actorId: number | null;
  alarmId?: number | null;
  ncrId?: number | null;
}

/**
 * Puts a lot on hold. A lot already on hold stays under its first hold: answers null then, unless
 * `refuseIfHeld`, which answers 409 (a person asking to hold a held lot should hear so).
 */
export async function placeHold(tx: Executor, h: HoldRequest, opts: { refuseIfHeld?: boolean } = {}): Promise<number | null> {
  const res = await tx.execute<{ id: number }>(sql`
    insert into lot_holds (lot_id, source, reason, alarm_id, ncr_id, placed_by)
    values (${h.lotId}, ${h.source}, ${h.reason}, ${h.alarmId ?? null}, ${h.ncrId ?? null}, ${h.actorId})
    on conflict (lot_id) where released_at is null do nothing
    returning id`);
  const id = res.rows[0]?.id ?? null;
  if (id === null) {
    if (opts.refuseIfHeld) throw new HttpError(409, `Lot ${h.lotNumber} is already on hold`);
    return null;
  }
  await recordAudit(tx, {
    actorId: h.actorId,
    entity: 'lot',
    action: h.actorId === null ? 'hold automatically' : 'hold',
    entityId: h.lotNumber,
    after: { status: 'on-hold', holdId: id, source: h.source, alarmId: h.alarmId ?? null, ncrId: h.ncrId ?? null },
    reason: h.reason,
  });
  return id;
}

/** Releases a lot's open hold; 409 when it is not on hold. Answers the released hold's id. */
export async function releaseHold(tx: Executor, r: { lotId: number; lotNumber: string; reason: string; actorId: number; ncrId?: number | null }): Promise<number> {
  const res = await tx.execute<{ id: number; source: HoldSource; reason: string }>(sql`
    update lot_holds set released_at = now(), released_by = ${r.actorId}, release_reason = ${r.reason}
    where lot_id = ${r.lotId} and released_at is null
    returning id, source, reason`);
  const hold = res.rows[0];
  if (!hold) throw new HttpError(409, `Lot ${r.lotNumber} is not on hold`);
  await recordAudit(tx, {
    actorId: r.actorId,
    entity: 'lot',
    action: 'release',
    entityId: r.lotNumber,
    before: { status: 'on-hold', holdId: hold.id, source: hold.source, holdReason: hold.reason },
    after: { status: 'released', ncrId: r.ncrId ?? null },
    reason: r.reason,
  });
  return hold.id;
}

/**
 * The automatic hold: every lot with an open out-of-spec alarm among `alarmIds` goes on hold, with the
 * alarm's sentence as the reason, in the transaction that raised or reopened the alarm. One hold per lot
 * (the lot's first alarm names it); a lot already on hold keeps its hold. No e-mail of its own: the
 * out-of-spec alarm's message already tells the subscribers, and says that the lot is held.
 *
 * A correction that brings the lot back inside the specification closes the alarm (data changed) but
 * does not release the lot: a quality manager releases it, with a reason, after looking at why the
 * first result was wrong; the lot page says that the result behind the hold was corrected.
 * Answers the number of holds placed.
 */
export async function holdOutOfSpecLots(tx: Executor, alarmIds: readonly number[]): Promise<number> {
  if (!alarmIds.length) return 0;
  const res = await tx.execute<{ id: number; lot_number: string; alarm_id: number; reason: string }>(sql`
    with wanted as (
      select distinct on (a.lot_id) a.lot_id, a.id as alarm_id, c.code || ' (' || c.name || '): ' || a.description as reason
      from alarms a join characteristics c on c.id = a.characteristic_id
      where a.id = any(${arr([...alarmIds])}::int[]) and a.rule = 'out-of-spec' and a.status = 'open'
      order by a.lot_id, a.id),
    placed as (
      insert into lot_holds (lot_id, source, reason, alarm_id, placed_by)
      select lot_id, 'out-of-spec', reason, alarm_id, null from wanted order by lot_id
      on conflict (lot_id) where released_at is null do nothing
      returning id, lot_id, alarm_id, reason)
    select p.id, l.lot_number, p.alarm_id, p.reason from placed p join lots l on l.id = p.lot_id`);
  if (!res.rows.length) return 0;
  await recordAudit(
    tx,
    res.rows.map((h) => ({
      actorId: null,
      entity: 'lot' as const,
      action: 'hold automatically' as const,
      entityId: h.lot_number,
      after: { status: 'on-hold', holdId: h.id, source: 'out-of-spec', alarmId: h.alarm_id, ncrId: null },
      reason: h.reason,
    })),
  );
  return res.rows.length;
}

type HoldRow = {
  id: number;
  source: HoldSource;
  reason: string;
  alarm_id: number | null;
  ncr_id: number | null;
  ncr_number: string | null;
  placed_by: string | null;
  placed_at: Date;
  released_at: Date | null;
  released_by: string | null;
  release_reason: string | null;
  cause_withdrawn: boolean;
};

/** Every hold of a lot, newest first, with who placed and released it. */
export async function holdsOfLot(tx: Executor, lotId: number): Promise<Json<LotHoldEntry>[]> {
  const res = await tx.execute<HoldRow>(sql`
    select h.id, h.source, h.reason, h.alarm_id, h.ncr_id, n.number as ncr_number, pu.name as placed_by, h.placed_at, h.released_at,
           ru.name as released_by, h.release_reason,
           coalesce(a.status = 'closed' and a.resolution = 'data-changed', false) as cause_withdrawn
    from lot_holds h
    left join ncrs n on n.id = h.ncr_id
    left join users pu on pu.id = h.placed_by
    left join users ru on ru.id = h.released_by
    left join alarms a on a.id = h.alarm_id
    where h.lot_id = ${lotId}
    order by h.placed_at desc, h.id desc`);
  return res.rows.map((h) => ({
    id: h.id,
    source: h.source,
    reason: h.reason,
    alarmId: h.alarm_id,
    ncr: h.ncr_id !== null ? { id: h.ncr_id, number: h.ncr_number! } : null,
    placedBy: h.placed_by,
    placedAt: h.placed_at,
    releasedAt: h.released_at,
    releasedBy: h.released_by,
    releaseReason: h.release_reason,
    causeWithdrawn: h.cause_withdrawn,
  }));
}
