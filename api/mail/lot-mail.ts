// The e-mail when a person puts a lot on hold or releases it: which lot, which product, why, who and
// when, and a link to the lot page. It goes to the immediate subscribers of the lot's line or product.
// An automatic hold (a result out of specification) sends none of its own: the out-of-spec alarm's
// message already goes to the same people and says that the lot is on hold, and it keeps to the
// immediate window, so a first run over months of history floods no one.
import { sql } from 'drizzle-orm';
import { formatPlantDateTime, plantTimeNote, type PlantClock, type PlantDateFormat } from '@shared/time';
import type { Executor } from '../spc/db';
import { escapeHtml, JUDGEMENT_NOTE, lotLink, type Composed } from './compose';
import { queueMail } from './outbox';

export type LotHoldMailKind = 'lot-hold' | 'lot-release';

/** What a hold or release message tells. */
export interface LotHoldMailFacts {
  kind: LotHoldMailKind;
  lotNumber: string;
  producedAt: Date;
  productCode: string;
  productName: string;
  lineCode: string;
  /** The reason given for this hold or release. */
  reason: string;
  /** On release: the reason the lot was held. */
  holdReason: string | null;
  /** Who decided; null: the system. */
  by: string | null;
  at: Date;
}

/** The message of one hold or release, for one subscriber's scope. */
export function composeLotHoldMail(f: LotHoldMailFacts, publicUrl: string, scope: string, clock: PlantClock): Composed {
  const held = f.kind === 'lot-hold';
  const subject = held ? `Prismline: lot ${f.lotNumber} (${f.productCode}) put on hold` : `Prismline: lot ${f.lotNumber} (${f.productCode}) released from hold`;
  const facts: [string, string][] = [
    ['Lot', `${f.lotNumber}, produced ${formatPlantDateTime(f.producedAt, clock)} on line ${f.lineCode}`],
    ['Product', `${f.productCode} · ${f.productName}`],
    [held ? 'Put on hold by' : 'Released by', `${f.by ?? 'Prismline (result outside the specification)'}, ${formatPlantDateTime(f.at, clock)}`],
    ['Reason', f.reason],
    ...(f.holdReason ? [['Held because', f.holdReason] as [string, string]] : []),
    ['Lot page', lotLink(publicUrl, f.lotNumber)],
  ];
  const heading = held ? `Lot ${f.lotNumber} is on hold: do not dispatch it until it is released.` : `Lot ${f.lotNumber} is released: it may be dispatched again.`;
  const footer = [
    plantTimeNote(clock.timeZone, f.at) + '.',
    JUDGEMENT_NOTE,
    `You receive this because you subscribed to immediate alerts for ${scope}. Change your subscriptions in Prismline under Alerts by e-mail: ${publicUrl.replace(/\/$/, '')}/subscriptions`,
  ];
  const text = [heading, '', ...facts.map(([k, v]) => `${k}: ${v}`), '', ...footer].join('\n');
  const html = [
    '<!doctype html><html><body style="font-family:sans-serif;font-size:14px;line-height:1.4">',
    `<h2 style="font-size:18px">${escapeHtml(heading)}</h2>`,
    '<table cellpadding="4" style="border-collapse:collapse">',
    ...facts.map(([k, v]) => `<tr><th align="left" valign="top">${escapeHtml(k)}</th><td>${k === 'Lot page' ? `<a href="${escapeHtml(v)}">${escapeHtml(v)}</a>` : escapeHtml(v)}</td></tr>`),
    '</table>',
    ...footer.map((p) => `<p>${escapeHtml(p)}</p>`),
    '</body></html>',
  ].join('\n');
  return { subject, text, html };
}

type Row = {
  lot_id: number;
  lot_number: string;
  produced_at: Date;
  product_code: string;
  product_name: string;
  line_code: string;
  reason: string;
  release_reason: string | null;
  placed_by: string | null;
  placed_at: Date;
  released_by: string | null;
  released_at: Date | null;
  time_zone: string;
  date_format: PlantDateFormat;
  user_id: number;
  email: string;
  scope: string;
};

/**
 * Queues the message of a hold just placed or released (`holdId`), in the deciding transaction: one to each
 * active immediate subscriber of the lot's line or product. Answers how many were queued.
 */
export async function queueLotHoldMail(tx: Executor, kind: LotHoldMailKind, holdId: number, publicUrl: string): Promise<number> {
  const res = await tx.execute<Row>(sql`
    select distinct on (u.id)
      l.id as lot_id, l.lot_number, l.produced_at, p.code as product_code, p.name as product_name, pl.code as line_code,
      h.reason, h.release_reason, pu.name as placed_by, h.placed_at, ru.name as released_by, h.released_at,
      pt.time_zone, pt.date_format, u.id as user_id, u.email,
      case when s.product_id is not null then 'product ' || p.code else 'line ' || sl.code end as scope
    from lot_holds h
    join lots l on l.id = h.lot_id
    join products p on p.id = l.product_id
    join production_lines pl on pl.id = l.line_id
    join plants pt on pt.id = p.plant_id
    left join users pu on pu.id = h.placed_by
    left join users ru on ru.id = h.released_by
    join alarm_subscriptions s on s.immediate and (s.product_id = p.id or s.line_id = l.line_id or s.line_id = p.line_id)
    left join production_lines sl on sl.id = s.line_id
    join users u on u.id = s.user_id and u.active
    where h.id = ${holdId}
    order by u.id, s.product_id nulls last`);
  return queueMail(
    tx,
    res.rows.map((r) => {
      const held = kind === 'lot-hold';
      const facts: LotHoldMailFacts = {
        kind,
        lotNumber: r.lot_number,
        producedAt: new Date(r.produced_at),
        productCode: r.product_code,
        productName: r.product_name,
        lineCode: r.line_code,
        reason: held ? r.reason : (r.release_reason ?? ''),
        holdReason: held ? null : r.reason,
        by: held ? r.placed_by : r.released_by,
        at: new Date(held ? r.placed_at : (r.released_at ?? r.placed_at)),
      };
      return {
        kind,
        dedupeKey: `${kind}:${holdId}:user:${r.user_id}`,
        to: { address: r.email, userId: r.user_id },
        ...composeLotHoldMail(facts, publicUrl, r.scope, { timeZone: r.time_zone, dateFormat: r.date_format }),
        refs: { lotIds: [r.lot_id] },
      };
    }),
  );
}
