// Who is told about which alarm: immediate messages go into the outbox in the transaction that
// raised the alarm; the digest collects a plant's new alarms of the last 24 hours.
import { sql } from 'drizzle-orm';
import type { Database } from '../db/client';
import { arr } from '../db/sql';
import { composeAlarmMail, composeDigest, type AlarmMailFacts, type DigestEntry } from './compose';
import { queueMail, type OutboxMail } from './outbox';
import { alarmsInContext, signalOfRow, type AlarmSignalColumns } from '../spc/alarms';

type FactsRow = AlarmSignalColumns & {
  alarm_id: number;
  rule: string;
  characteristic_id: number;
  code: string;
  name: string;
  unit: string;
  decimals: number;
  product_code: string;
  product_name: string;
  line_code: string | null;
  lot_number: string;
  produced_at: Date;
  shift: string | null;
  created_at: Date;
  user_id: number;
  email: string;
  scope: string;
};

const factsOf = (r: FactsRow): AlarmMailFacts => ({
  alarmId: r.alarm_id,
  rule: r.rule,
  characteristicId: r.characteristic_id,
  characteristicCode: r.code,
  characteristicName: r.name,
  unit: r.unit,
  decimals: r.decimals,
  productCode: r.product_code,
  productName: r.product_name,
  lineCode: r.line_code,
  lotNumber: r.lot_number,
  producedAt: new Date(r.produced_at),
  shift: r.shift,
  ...signalOfRow(r),
});

/** Alarms with each active subscriber of their product or line (once per user) who wants `kind`. */
const subscriberFacts = (kind: 'immediate' | 'digest', where: ReturnType<typeof sql>) => sql`
  select distinct on (a.id, u.id)
    a.id as alarm_id, a.rule, a.characteristic_id, c.code, c.name, c.unit, tm.decimals, p.code as product_code, p.name as product_name,
    pl.code as line_code, l.lot_number, l.produced_at, l.shift, a.point_index, a.statistic, a."values", a.limit_name, a.limit_value,
    a.description, a.late_reason, a.created_at, u.id as user_id, u.email,
    case when s.product_id is not null then 'product ' || p.code else 'line ' || pl.code end as scope
  ${alarmsInContext}
  join alarm_subscriptions s on s.${sql.raw(kind)} and (s.product_id = p.id or s.line_id = p.line_id)
  join users u on u.id = s.user_id and u.active
  where ${where}
  order by a.id, u.id, s.product_id nulls last`;

/** One message per alarm and subscriber; the dedupe key makes a second call a no-op. */
export async function queueAlarmMail(tx: Pick<Database, 'execute'>, alarmIds: number[], publicUrl: string): Promise<number> {
  if (!alarmIds.length) return 0;
  const res = await tx.execute<FactsRow>(subscriberFacts('immediate', sql`a.id = any(${arr(alarmIds)}::int[])`));
  if (!res.rows.length) return 0;
  return queueMail(
    tx,
    res.rows.map((r) => ({
      kind: 'alarm',
      dedupeKey: `alarm:${r.alarm_id}:user:${r.user_id}`,
      to: { address: r.email, userId: r.user_id },
      ...composeAlarmMail(factsOf(r), publicUrl, r.scope),
      refs: { alarmIds: [r.alarm_id] },
    })),
  );
}

/** The plant's local calendar date of an instant, yyyy-mm-dd. */
export function localDate(at: Date, timeZone: string): string {
  return new Intl.DateTimeFormat('en-CA', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' }).format(at);
}

/** Queues each digest subscriber's message of the plant's alarms raised in the 24 hours before `now`. */
export async function queueDigests(db: Pick<Database, 'execute'>, opts: { plantId: number; timeZone: string; now: Date; publicUrl: string }): Promise<number> {
  const from = new Date(opts.now.getTime() - 24 * 3600 * 1000);
  const day = localDate(opts.now, opts.timeZone);
  const res = await db.execute<FactsRow>(
    subscriberFacts('digest', sql`p.plant_id = ${opts.plantId} and a.created_at > ${from.toISOString()}::timestamptz and a.created_at <= ${opts.now.toISOString()}::timestamptz`),
  );
  const byUser = new Map<number, { email: string; entries: DigestEntry[] }>();
  for (const r of res.rows) {
    const u = byUser.get(r.user_id) ?? { email: r.email, entries: [] };
    u.entries.push({ ...factsOf(r), createdAt: new Date(r.created_at) });
    byUser.set(r.user_id, u);
  }
  const mails: OutboxMail[] = [];
  for (const [userId, u] of byUser) {
    u.entries.sort((a, b) => a.characteristicCode.localeCompare(b.characteristicCode) || a.pointIndex - b.pointIndex);
    mails.push({
      kind: 'digest',
      dedupeKey: `digest:${opts.plantId}:${day}:user:${userId}`,
      to: { address: u.email, userId },
      ...composeDigest(u.entries, opts.publicUrl, { from, to: opts.now }, day),
      refs: { alarmIds: u.entries.map((e) => e.alarmId) },
    });
  }
  return queueMail(db, mails);
}
