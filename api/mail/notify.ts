// Who is told about which alarm. One e-mail per lot and occasion (a run, or an import judging its
// lots): it lists every signal the occasion found on the lot, so a lot with three failing readings is
// one message, not one per alarm. The digest collects a plant's signals detected in the last 24 hours.
import { sql } from 'drizzle-orm';
import { plantDay, type PlantDateFormat } from '@shared/time';
import type { Database } from '../db/client';
import { arr } from '../db/sql';
import { composeDigest, composeLotMail, type LotMailFacts } from './compose';
import { queueMail, type OutboxMail } from './outbox';
import { alarmsInContext } from '../spc/alarms';

/** Rules that e-mail subscribers at once (a falling capability too: it concerns every lot to come); the rest wait for the morning digest. */
export const IMMEDIATE_RULES: readonly string[] = ['out-of-spec', 'we1', 'capability'];

/**
 * An immediate e-mail only for a signal whose lot's result was tested (or, without a test time,
 * whose lot was produced) within this many hours before the signal was detected. Older history — a
 * first run over months of data, a late backlog — goes to the morning digest only, so a first run
 * never floods anyone's mailbox.
 */
export const IMMEDIATE_WINDOW_HOURS = 48;

type FactsRow = {
  alarm_id: number;
  rule: string;
  characteristic_id: number;
  code: string;
  name: string;
  unit: string;
  decimals: number;
  description: string;
  late_reason: string | null;
  detected_at: Date;
  lot_id: number;
  lot_number: string;
  produced_at: Date;
  shift: string | null;
  product_code: string;
  product_name: string;
  line_code: string | null;
  time_zone: string;
  date_format: PlantDateFormat;
  user_id: number;
  email: string;
  scope: string;
};

/** Alarms with each active subscriber of their product or line (once per user) who wants `kind`. */
const subscriberFacts = (kind: 'immediate' | 'digest', where: ReturnType<typeof sql>) => sql`
  select distinct on (a.id, u.id)
    a.id as alarm_id, a.rule, a.characteristic_id, c.code, c.name, c.unit, tm.decimals, a.description, a.late_reason, a.detected_at,
    l.id as lot_id, l.lot_number, l.produced_at, l.shift, p.code as product_code, p.name as product_name, pl.code as line_code,
    pt.time_zone, pt.date_format, u.id as user_id, u.email,
    case when s.product_id is not null then 'product ' || p.code else 'line ' || pl.code end as scope
  ${alarmsInContext}
  join plants pt on pt.id = p.plant_id
  join alarm_subscriptions s on s.${sql.raw(kind)} and (s.product_id = p.id or s.line_id = p.line_id)
  join users u on u.id = s.user_id and u.active
  where ${where}
  order by a.id, u.id, s.product_id nulls last`;

/** Groups rows by recipient and lot: one entry per message. */
function byRecipientAndLot(rows: FactsRow[]) {
  const groups = new Map<string, { userId: number; email: string; scope: string; clock: { timeZone: string; dateFormat: PlantDateFormat }; lot: LotMailFacts }>();
  for (const r of rows) {
    const key = `${r.user_id}|${r.lot_id}`;
    let g = groups.get(key);
    if (!g) {
      g = {
        userId: r.user_id,
        email: r.email,
        scope: r.scope,
        clock: { timeZone: r.time_zone, dateFormat: r.date_format },
        lot: { lotId: r.lot_id, lotNumber: r.lot_number, producedAt: new Date(r.produced_at), shift: r.shift, productCode: r.product_code, productName: r.product_name, lineCode: r.line_code, signals: [] },
      };
      groups.set(key, g);
    }
    g.lot.signals.push({
      alarmId: r.alarm_id,
      rule: r.rule,
      characteristicId: r.characteristic_id,
      characteristicCode: r.code,
      characteristicName: r.name,
      unit: r.unit,
      decimals: r.decimals,
      description: r.description,
      lateReason: r.late_reason,
      detectedAt: new Date(r.detected_at),
    });
  }
  return [...groups.values()];
}

/**
 * The immediate e-mails of an occasion (`run:12`, `import:345`): one per subscriber and lot, listing
 * every open signal of an immediate rule among `alarmIds` whose result is recent (IMMEDIATE_WINDOW_HOURS).
 * The dedupe key names lot and occasion, so the same lot is never mailed twice for one run.
 */
export async function queueLotMail(tx: Pick<Database, 'execute'>, alarmIds: number[], occasion: string, publicUrl: string): Promise<number> {
  if (!alarmIds.length) return 0;
  const res = await tx.execute<FactsRow>(
    subscriberFacts(
      'immediate',
      sql`a.id = any(${arr(alarmIds)}::int[]) and a.status = 'open' and a.rule = any(${arr([...IMMEDIATE_RULES])}::text[])
        and coalesce((select max(m.tested_at) from measurements m where m.lot_id = a.lot_id and m.characteristic_id = a.characteristic_id and m.voided_at is null), l.produced_at)
            >= a.detected_at - make_interval(hours => ${IMMEDIATE_WINDOW_HOURS})`,
    ),
  );
  if (!res.rows.length) return 0;
  return queueMail(
    tx,
    byRecipientAndLot(res.rows).map((g) => ({
      kind: 'alarm',
      dedupeKey: `lot:${g.lot.lotId}:${occasion}:user:${g.userId}`,
      to: { address: g.email, userId: g.userId },
      ...composeLotMail(g.lot, publicUrl, g.scope, g.clock),
      refs: { alarmIds: g.lot.signals.map((s) => s.alarmId), lotIds: [g.lot.lotId] },
    })),
  );
}

/** The immediate e-mails of a finished run: every alarm it raised or reopened, collated by lot. */
export async function queueRunMail(tx: Pick<Database, 'execute'>, runId: number, publicUrl: string): Promise<number> {
  const res = await tx.execute<{ id: number }>(sql`select id from alarms where run_id = ${runId} and status = 'open' order by id`);
  return queueLotMail(tx, res.rows.map((r) => r.id), `run:${runId}`, publicUrl);
}

/** The plant's calendar date of an instant, yyyy-mm-dd (schedule and digest keys). */
export const localDate = (at: Date, timeZone: string): string => plantDay(at, timeZone);

/** Queues each digest subscriber's message of the plant's signals detected in the 24 hours before `now`. */
export async function queueDigests(db: Pick<Database, 'execute'>, opts: { plantId: number; timeZone: string; now: Date; publicUrl: string }): Promise<number> {
  const from = new Date(opts.now.getTime() - 24 * 3600 * 1000);
  const res = await db.execute<FactsRow>(
    subscriberFacts('digest', sql`p.plant_id = ${opts.plantId} and a.detected_at > ${from.toISOString()}::timestamptz and a.detected_at <= ${opts.now.toISOString()}::timestamptz`),
  );
  const byUser = new Map<number, { email: string; lots: LotMailFacts[] }>();
  for (const g of byRecipientAndLot(res.rows)) {
    const u = byUser.get(g.userId) ?? { email: g.email, lots: [] };
    u.lots.push(g.lot);
    byUser.set(g.userId, u);
  }
  const clock = { timeZone: opts.timeZone, dateFormat: res.rows[0]?.date_format ?? 'dd/MM/yyyy' };
  const day = localDate(opts.now, opts.timeZone);
  const mails: OutboxMail[] = [];
  for (const [userId, u] of byUser) {
    mails.push({
      kind: 'digest',
      dedupeKey: `digest:${opts.plantId}:${day}:user:${userId}`,
      to: { address: u.email, userId },
      ...composeDigest(u.lots, opts.publicUrl, { from, to: opts.now }, clock),
      refs: { alarmIds: u.lots.flatMap((l) => l.signals.map((s) => s.alarmId)), lotIds: u.lots.map((l) => l.lotId) },
    });
  }
  return queueMail(db, mails);
}
