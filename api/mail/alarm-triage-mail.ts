// The e-mails of a person's decision on an alarm: a closed alarm opened again (its line's and product's
// immediate subscribers and its assignee are told, once per reopening) and an alarm assigned to someone
// (the new assignee is told). Plain text and simple HTML with the same content, times in plant time.
import { sql } from 'drizzle-orm';
import { signalName } from '@shared/spc';
import { formatPlantDateTime, plantTimeNote, type PlantClock, type PlantDateFormat } from '@shared/time';
import type { Database } from '../db/client';
import { chartLink, JUDGEMENT_NOTE, lotLink, type Composed } from './compose';
import { queueMail } from './outbox';

type Executor = Pick<Database, 'execute'>;

/** What an e-mail about one alarm says about it. */
export interface AlarmMailFacts {
  alarmId: number;
  rule: string;
  description: string;
  characteristicId: number;
  characteristicCode: string;
  characteristicName: string;
  productCode: string;
  lineCode: string | null;
  lotNumber: string;
  producedAt: Date;
}

const escapeHtml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
const base = (publicUrl: string) => publicUrl.replace(/\/$/, '');
/** The alarm's own page in the web app. */
export const alarmLink = (publicUrl: string, alarmId: number) => `${base(publicUrl)}/alarms/${alarmId}`;

function compose(a: AlarmMailFacts, o: { subject: string; heading: string; what: [string, string][]; closing: string }, publicUrl: string, clock: PlantClock): Composed {
  const facts: [string, string][] = [
    ['Signal', `${signalName(a.rule)}: ${a.description}`],
    ['Characteristic', `${a.characteristicCode} · ${a.characteristicName}`],
    ['Product', `${a.productCode}${a.lineCode ? ` (line ${a.lineCode})` : ''}`],
    ['Lot', `${a.lotNumber}, produced ${formatPlantDateTime(a.producedAt, clock)}`],
    ...o.what,
    ['Alarm', alarmLink(publicUrl, a.alarmId)],
    ['Chart', chartLink(publicUrl, a.characteristicId, a.lotNumber)],
    ['Lot page', lotLink(publicUrl, a.lotNumber)],
  ];
  const footer = [plantTimeNote(clock.timeZone, a.producedAt) + '.', o.closing, JUDGEMENT_NOTE];
  const isLink = (k: string) => k === 'Alarm' || k === 'Chart' || k === 'Lot page';
  const text = [o.heading, '', ...facts.map(([k, v]) => `${k}: ${v}`), '', ...footer].join('\n');
  const html = [
    '<!doctype html><html><body style="font-family:sans-serif;font-size:14px;line-height:1.4">',
    `<h2 style="font-size:18px">${escapeHtml(o.heading)}</h2>`,
    '<table cellpadding="4" style="border-collapse:collapse">',
    ...facts.map(([k, v]) => `<tr><th align="left" valign="top">${escapeHtml(k)}</th><td>${isLink(k) ? `<a href="${escapeHtml(v)}">${escapeHtml(v)}</a>` : escapeHtml(v)}</td></tr>`),
    '</table>',
    ...footer.map((p) => `<p>${escapeHtml(p)}</p>`),
    '</body></html>',
  ].join('\n');
  return { subject: o.subject, text, html };
}

/** The e-mail telling that a closed alarm was opened again, by whom and why. */
export function composeReopenedMail(a: AlarmMailFacts, o: { by: string; reason: string; at: Date }, publicUrl: string, clock: PlantClock): Composed {
  return compose(
    a,
    {
      subject: `Prismline alarm reopened: lot ${a.lotNumber} — ${signalName(a.rule)} (${a.characteristicCode})`,
      heading: `Alarm on lot ${a.lotNumber} opened again`,
      what: [
        ['Reopened', `${formatPlantDateTime(o.at, clock)} by ${o.by}`],
        ['Why', o.reason],
      ],
      closing: 'The alarm waits for a decision again: look at the chart and the lot, and record what you find on the alarm page.',
    },
    publicUrl,
    clock,
  );
}

/** The e-mail telling a person an alarm was assigned to them. */
export function composeAssignedMail(a: AlarmMailFacts, o: { by: string; note: string | null }, publicUrl: string, clock: PlantClock): Composed {
  return compose(
    a,
    {
      subject: `Prismline alarm assigned to you: lot ${a.lotNumber} — ${signalName(a.rule)} (${a.characteristicCode})`,
      heading: `${o.by} assigned you the alarm on lot ${a.lotNumber}`,
      what: o.note ? [['Note', o.note]] : [],
      closing: 'You follow this alarm up: look at the chart and the lot, and record what you check and find on the alarm page.',
    },
    publicUrl,
    clock,
  );
}

type FactsRow = {
  alarm_id: number;
  rule: string;
  description: string;
  characteristic_id: number;
  code: string;
  name: string;
  product_id: number;
  product_code: string;
  line_id: number | null;
  line_code: string | null;
  lot_number: string;
  produced_at: Date;
  time_zone: string;
  date_format: PlantDateFormat;
  assignee_id: number | null;
  reopened_at: Date | null;
  actor: string;
};

async function factsOf(tx: Executor, alarmId: number, actorId: number): Promise<{ facts: AlarmMailFacts; row: FactsRow; clock: PlantClock }> {
  const res = await tx.execute<FactsRow>(sql`
    select a.id as alarm_id, a.rule, a.description, a.characteristic_id, c.code, c.name, p.id as product_id, p.code as product_code,
      p.line_id, pl.code as line_code, l.lot_number, l.produced_at, pt.time_zone, pt.date_format, a.assignee_id, a.reopened_at,
      (select name from users where id = ${actorId}) as actor
    from alarms a
    join characteristics c on c.id = a.characteristic_id
    join products p on p.id = c.product_id
    join plants pt on pt.id = p.plant_id
    left join production_lines pl on pl.id = p.line_id
    join lots l on l.id = a.lot_id
    where a.id = ${alarmId}`);
  const r = res.rows[0];
  return {
    row: r,
    clock: { timeZone: r.time_zone, dateFormat: r.date_format },
    facts: {
      alarmId: r.alarm_id,
      rule: r.rule,
      description: r.description,
      characteristicId: r.characteristic_id,
      characteristicCode: r.code,
      characteristicName: r.name,
      productCode: r.product_code,
      lineCode: r.line_code,
      lotNumber: r.lot_number,
      producedAt: new Date(r.produced_at),
    },
  };
}

/**
 * Queues the reopening e-mail to the active immediate subscribers of the alarm's product or line and to
 * its assignee, each once; the dedupe key names the reopening's time, so every reopening is told.
 */
export async function queueReopenedMail(tx: Executor, o: { alarmId: number; byUserId: number; reason: string; publicUrl: string }): Promise<number> {
  const { facts, row, clock } = await factsOf(tx, o.alarmId, o.byUserId);
  const to = await tx.execute<{ id: number; email: string }>(sql`
    select u.id, u.email from users u
    where u.active and (
      u.id = ${row.assignee_id}
      or exists (select 1 from alarm_subscriptions s where s.user_id = u.id and s.immediate and (s.product_id = ${row.product_id} or s.line_id = ${row.line_id})))
    order by u.id`);
  const at = new Date(row.reopened_at ?? Date.now());
  const composed = composeReopenedMail(facts, { by: row.actor, reason: o.reason, at }, o.publicUrl, clock);
  return queueMail(
    tx,
    to.rows.map((u) => ({
      kind: 'alarm-reopened' as const,
      dedupeKey: `alarm-reopened:${o.alarmId}:${at.getTime()}:user:${u.id}`,
      to: { address: u.email, userId: u.id },
      ...composed,
      refs: { alarmIds: [o.alarmId] },
    })),
  );
}

/** Queues the e-mail to the new assignee of an alarm; the dedupe key names the assignment's time. */
export async function queueAssignedMail(tx: Executor, o: { alarmId: number; assigneeId: number; byUserId: number; note: string | null; publicUrl: string }): Promise<number> {
  const { facts, row, clock } = await factsOf(tx, o.alarmId, o.byUserId);
  const to = await tx.execute<{ email: string; at_ms: number }>(sql`select email, (extract(epoch from now()) * 1000)::float8 as at_ms from users where id = ${o.assigneeId} and active`);
  if (!to.rows[0]) return 0;
  return queueMail(tx, {
    kind: 'alarm-assigned',
    dedupeKey: `alarm-assigned:${o.alarmId}:user:${o.assigneeId}:${Math.round(Number(to.rows[0].at_ms))}`,
    to: { address: to.rows[0].email, userId: o.assigneeId },
    ...composeAssignedMail(facts, { by: row.actor, note: o.note }, o.publicUrl, clock),
    refs: { alarmIds: [o.alarmId] },
  });
}
