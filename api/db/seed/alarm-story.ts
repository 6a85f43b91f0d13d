// The alarm and e-mail side of the demo story: the quality manager subscribed to both lines (at once
// and in the morning digest), alarms dated by the plant's nightly run that would have found them, and
// the first morning's digest in the outbox. The first run over the whole history e-mails at once only
// the lots whose results are recent (IMMEDIATE_WINDOW_HOURS in api/mail/notify.ts); older history goes
// to the digest only, so the first start does not flood anyone's mailbox.
import { TZDate } from '@date-fns/tz';
import { sql } from 'drizzle-orm';
import { plantDay } from '@shared/time';
import type { Database } from '../client';
import { arr } from '../sql';
import { queueDigests } from '@api/mail/notify';

/** The manager is told about both lines: at once and in the morning digest. */
export async function subscribeDemoManager(db: Pick<Database, 'execute'>, managerId: number): Promise<void> {
  await db.execute(sql`
    insert into alarm_subscriptions (user_id, line_id, immediate, digest)
    select ${managerId}, id, true, true from production_lines order by id
    on conflict do nothing`);
}

/**
 * The first time a daily cron ("m h * * *", plant time) fires after `after`; null for any other
 * schedule, which the demo does not use.
 */
export function nextNightlyRun(after: Date, cron: string, timeZone: string): Date | null {
  const m = /^(\d{1,2}) (\d{1,2}) \* \* \*$/.exec(cron.trim());
  if (!m) return null;
  const [y, mo, d] = plantDay(after, timeZone).split('-').map(Number);
  for (let add = 0; add < 3; add++) {
    const at = new TZDate(y, mo - 1, d + add, Number(m[2]), Number(m[1]), timeZone);
    if (at.getTime() > after.getTime()) return new Date(at.getTime());
  }
  return null;
}

/**
 * Dates each alarm of the demo history at the nightly run after its lot's result (the newest test time
 * of the lot's results, or its production), as if the plant had run Prismline all along. What the
 * first run e-mailed at once, and what no nightly run would have found yet, keeps the first run's time.
 */
export async function dateDemoDetections(db: Pick<Database, 'execute'>, now: Date): Promise<void> {
  const res = await db.execute<{ id: number; result_ms: number; cron: string; time_zone: string }>(sql`
    select a.id, (extract(epoch from coalesce(
             (select max(m.tested_at) from measurements m where m.lot_id = a.lot_id and m.characteristic_id = a.characteristic_id and m.voided_at is null), l.produced_at)) * 1000)::float8 as result_ms,
           pt.nightly_run_cron as cron, pt.time_zone
    from alarms a join lots l on l.id = a.lot_id join characteristics c on c.id = a.characteristic_id join products p on p.id = c.product_id join plants pt on pt.id = p.plant_id
    where not exists (select from mail_outbox o where o.kind = 'alarm' and o.refs -> 'alarmIds' @> to_jsonb(a.id))`);
  const ids: number[] = [];
  const times: string[] = [];
  for (const r of res.rows) {
    const at = nextNightlyRun(new Date(Number(r.result_ms)), r.cron, r.time_zone);
    if (!at || at.getTime() >= now.getTime()) continue;
    ids.push(r.id);
    times.push(at.toISOString());
  }
  if (!ids.length) return;
  await db.execute(sql`
    update alarms a set detected_at = u.at from unnest(${arr(ids)}::int[], ${arr(times)}::timestamptz[]) as u(id, at) where a.id = u.id`);
}

/** The morning digest of the history's last day, as the plant's digest would have sent it at its end. */
export async function queueFirstMorningDigest(db: Pick<Database, 'execute'>, opts: { endDate: Date; publicUrl: string }): Promise<number> {
  const plants = await db.execute<{ id: number; time_zone: string }>(sql`select id, time_zone from plants order by id`);
  let queued = 0;
  for (const p of plants.rows) queued += await queueDigests(db, { plantId: p.id, timeZone: p.time_zone, now: opts.endDate, publicUrl: opts.publicUrl });
  return queued;
}
