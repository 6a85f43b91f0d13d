// Lot holds: the one way a lot is put on hold or released, by a person, by the system (a result out of
// specification) or by an NCR, each an audit event in the caller's transaction. A lot's status is
// derived, never stored: lotStatusSql is the rule every query uses.
import { sql, type SQL } from 'drizzle-orm';
import type { HoldSource, LotStatus } from '@shared/schemas/lots';
import { recordAudit } from '../db/audit';
import { HttpError } from '../http/errors';
import type { Executor } from '../spc/db';

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
