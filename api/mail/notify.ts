// Who is told about which alarm. One e-mail per lot and occasion (a run, or an import judging its
// lots): it lists every signal the occasion found on the lot, so a lot with three failing readings is
// one message, not one per alarm. The digest collects a plant's signals detected in the last 24 hours.
import { sql } from 'drizzle-orm';
import { plantDay, type PlantDateFormat } from '@shared/time';
import type { Database } from '../db/client';
import { arr, inTurn } from '../db/sql';
import { composeDigest, composeLotMail, type DigestNcr, type DigestNcrAction, type DigestNcrFacts, type LotMailFacts } from './compose';
import { queueMail, type OutboxMail } from './outbox';
import { alarmsInContext } from '../spc/alarms';

/**
 * Rules that e-mail subscribers at once: a lot to stop. The rest wait for the morning digest, a falling
 * capability among them (a trend over many lots; a first run would otherwise mail one per characteristic).
 */
export const IMMEDIATE_RULES: readonly string[] = ['out-of-spec', 'we1'];

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

/** NCRs and overdue actions the digest lists at most, each list; the counts say how many there are. */
const DIGEST_NCR_ROWS = 20;

/** The plant's NCR section of the digest: open NCRs, those raised in the period, and overdue actions (by the plant's day of `now`). */
async function digestNcrFacts(db: Pick<Database, 'execute'>, plantId: number, from: Date, now: Date, timeZone: string): Promise<DigestNcrFacts> {
  const ncrColumns = sql`n.id, n.number, n.title, n.severity::text as severity, n.status::text as status, p.code as product_code, count(*) over ()::int as total`;
  type Row = { id: number; number: string; title: string; severity: string; status: string; product_code: string | null; total: number };
  const toNcr = (r: Row): DigestNcr => ({ id: r.id, number: r.number, title: r.title, severity: r.severity, status: r.status, productCode: r.product_code });
  const today = plantDay(now, timeZone);
  const [open, raised, overdue] = await inTurn([
    () => db.execute<Row>(sql`select ${ncrColumns} from ncrs n left join products p on p.id = n.product_id
      where n.plant_id = ${plantId} and n.status <> 'closed' and n.created_at <= ${now.toISOString()}::timestamptz order by n.created_at desc, n.id desc limit ${DIGEST_NCR_ROWS}`),
    () => db.execute<Row>(sql`select ${ncrColumns} from ncrs n left join products p on p.id = n.product_id
      where n.plant_id = ${plantId} and n.created_at > ${from.toISOString()}::timestamptz and n.created_at <= ${now.toISOString()}::timestamptz order by n.created_at desc, n.id desc limit ${DIGEST_NCR_ROWS}`),
    () => db.execute<{ ncr_id: number; number: string; id: number; description: string; owner_name: string; due_date: string; total: number }>(sql`
      select x.ncr_id, n.number, x.id, x.description, u.name as owner_name, x.due_date::text as due_date, count(*) over ()::int as total
      from ncr_actions x join ncrs n on n.id = x.ncr_id join users u on u.id = x.owner_id
      where n.plant_id = ${plantId} and n.status <> 'closed' and x.done_date is null and x.due_date < ${today}::date
      order by x.due_date, x.id limit ${DIGEST_NCR_ROWS}`),
  ]);
  return {
    open: open.rows.map(toNcr),
    openCount: open.rows[0]?.total ?? 0,
    raised: raised.rows.map(toNcr),
    raisedCount: raised.rows[0]?.total ?? 0,
    overdue: overdue.rows.map(
      (r): DigestNcrAction => ({ ncrId: r.ncr_id, ncrNumber: r.number, actionId: r.id, description: r.description, ownerName: r.owner_name, dueDate: r.due_date }),
    ),
    overdueCount: overdue.rows[0]?.total ?? 0,
  };
}

/**
 * Queues each digest subscriber's message of the plant's signals detected in the 24 hours before `now`,
 * with the plant's NCR section. A subscriber without signals gets the digest too when an NCR was raised
 * in the period or an action is overdue.
 */
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
  const ncrs = await digestNcrFacts(db, opts.plantId, from, opts.now, opts.timeZone);
  if (ncrs.raisedCount || ncrs.overdueCount) {
    const subscribers = await db.execute<{ id: number; email: string }>(sql`
      select distinct u.id, u.email from alarm_subscriptions s join users u on u.id = s.user_id and u.active
      left join products p on p.id = s.product_id left join production_lines pl on pl.id = s.line_id
      where s.digest and coalesce(p.plant_id, pl.plant_id) = ${opts.plantId} order by u.id`);
    for (const u of subscribers.rows) if (!byUser.has(u.id)) byUser.set(u.id, { email: u.email, lots: [] });
  }
  const plant = await db.execute<{ date_format: PlantDateFormat }>(sql`select date_format from plants where id = ${opts.plantId}`);
  const clock = { timeZone: opts.timeZone, dateFormat: res.rows[0]?.date_format ?? plant.rows[0]?.date_format ?? 'dd/MM/yyyy' };
  const day = localDate(opts.now, opts.timeZone);
  const mails: OutboxMail[] = [];
  for (const [userId, u] of byUser) {
    mails.push({
      kind: 'digest',
      dedupeKey: `digest:${opts.plantId}:${day}:user:${userId}`,
      to: { address: u.email, userId },
      ...composeDigest(u.lots, opts.publicUrl, { from, to: opts.now }, clock, ncrs),
      refs: { alarmIds: u.lots.flatMap((l) => l.signals.map((s) => s.alarmId)), lotIds: u.lots.map((l) => l.lotId) },
    });
  }
  return queueMail(db, mails);
}
