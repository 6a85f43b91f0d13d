// The e-mails of nonconformance reports: raised, assigned, closed or reopened (to the assignee and the
// immediate subscribers of its product or line), and reminders of actions falling due or overdue (to
// the owner and the assignee). Plain text and simple HTML with the same content; times in plant time.
import { sql } from 'drizzle-orm';
import { ncrStatusWords, type NcrSeverity, type NcrStatus } from '@shared/schemas/ncrs';
import { formatPlantDate, type PlantClock, type PlantDateFormat } from '@shared/time';
import type { Database } from '../db/client';
import { arr } from '../db/sql';
import { JUDGEMENT_NOTE, type Composed } from './compose';
import { queueMail, type OutboxMail } from './outbox';

/** What an NCR's messages tell. */
export interface NcrMailFacts {
  id: number;
  number: string;
  title: string;
  description: string;
  severity: NcrSeverity;
  status: NcrStatus;
  productCode: string | null;
  productName: string | null;
  lineCode: string | null;
  lotNumbers: string[];
  assigneeName: string | null;
}

/** The occasions an NCR is told about. */
export type NcrOccasion = 'raised' | 'assigned' | 'closed' | 'reopened';

const escapeHtml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
const base = (publicUrl: string) => publicUrl.replace(/\/$/, '');

/** The NCR's page, the same address as the web app's. */
export const ncrLink = (publicUrl: string, ncrId: number) => `${base(publicUrl)}/ncrs/${ncrId}`;

/** Lots named in a message: the first twenty, then how many more. */
const lotList = (lots: string[]) => (lots.length === 0 ? 'none listed' : lots.length <= 20 ? lots.join(', ') : `${lots.slice(0, 20).join(', ')} and ${lots.length - 20} more`);
const productText = (n: NcrMailFacts) => (n.productCode ? `${n.productCode} · ${n.productName}${n.lineCode ? ` (line ${n.lineCode})` : ''}` : 'not named');

function render(heading: string, facts: [string, string][], paragraphs: string[], link: string): { text: string; html: string } {
  const text = [heading, '', ...facts.map(([k, v]) => `${k}: ${v}`), `Page: ${link}`, '', ...paragraphs].join('\n');
  const html = [
    '<!doctype html><html><body style="font-family:sans-serif;font-size:14px;line-height:1.4">',
    `<h2 style="font-size:18px">${escapeHtml(heading)}</h2>`,
    '<table cellpadding="4" style="border-collapse:collapse">',
    ...facts.map(([k, v]) => `<tr><th align="left" valign="top">${escapeHtml(k)}</th><td>${escapeHtml(v).replace(/\n/g, '<br>')}</td></tr>`),
    `<tr><th align="left">Page</th><td><a href="${escapeHtml(link)}">${escapeHtml(link)}</a></td></tr>`,
    '</table>',
    ...paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`),
    '</body></html>',
  ].join('\n');
  return { text, html };
}

/** An NCR raised, assigned, closed or reopened: who did what, and the facts of the report. */
export function composeNcrMail(n: NcrMailFacts, occasion: NcrOccasion, by: { actorName: string; reason?: string | null }, publicUrl: string): Composed {
  const happened: Record<NcrOccasion, string> = {
    raised: `${n.number} was raised by ${by.actorName}.`,
    assigned: n.assigneeName ? `${n.number} was assigned to ${n.assigneeName} by ${by.actorName}.` : `${by.actorName} removed the assignee of ${n.number}.`,
    closed: `${n.number} was closed by ${by.actorName}: the effectiveness check found the actions effective.`,
    reopened: `${n.number} was reopened by ${by.actorName}.`,
  };
  const verb: Record<NcrOccasion, string> = { raised: 'raised', assigned: 'assigned', closed: 'closed', reopened: 'reopened' };
  const subject = `Prismline NCR ${verb[occasion]}: ${n.number} — ${n.title}${n.productCode ? ` (${n.productCode})` : ''}`;
  const facts: [string, string][] = [
    ['What happened', happened[occasion]],
    ...(by.reason ? ([['Reason', by.reason]] as [string, string][]) : []),
    ['NCR', `${n.number}: ${n.title}`],
    ['Severity', n.severity],
    ['State', ncrStatusWords[n.status]],
    ['Product', productText(n)],
    ['Lots', lotList(n.lotNumbers)],
    ['Assignee', n.assigneeName ?? 'nobody yet'],
    ...(occasion === 'raised' ? ([['Description', n.description]] as [string, string][]) : []),
  ];
  const { text, html } = render(`${n.number} ${verb[occasion]}`, facts, [JUDGEMENT_NOTE], ncrLink(publicUrl, n.id));
  return { subject, text, html };
}

/** A plant calendar day (YYYY-MM-DD, no zone) in the plant's date format: noon UTC of that day is that day in UTC. */
export const plantDayText = (day: string, clock: PlantClock) => formatPlantDate(new Date(`${day}T12:00:00Z`), { timeZone: 'UTC', dateFormat: clock.dateFormat });

/** One action a reminder is about. */
export interface NcrActionMailFacts {
  actionId: number;
  kind: string;
  description: string;
  ownerName: string;
  /** Plant calendar day, YYYY-MM-DD. */
  dueDate: string;
}

/** A reminder: the action falls due within two days, or is overdue. */
export function composeNcrActionReminder(n: NcrMailFacts, a: NcrActionMailFacts, state: 'due-soon' | 'overdue', publicUrl: string, clock: PlantClock): Composed {
  const due = plantDayText(a.dueDate, clock);
  const subject = `Prismline NCR action ${state === 'overdue' ? 'overdue' : 'due soon'}: ${n.number} — action #${a.actionId} due ${due}`;
  const facts: [string, string][] = [
    ['What happened', state === 'overdue' ? `The ${a.kind} action #${a.actionId} of ${n.number} was due on ${due} and is not recorded as done.` : `The ${a.kind} action #${a.actionId} of ${n.number} is due on ${due}.`],
    ['Action', a.description],
    ['Owner', a.ownerName],
    ['NCR', `${n.number}: ${n.title}`],
    ['Product', productText(n)],
    ['Lots', lotList(n.lotNumbers)],
    ['Assignee', n.assigneeName ?? 'nobody yet'],
  ];
  const { text, html } = render(
    `Action #${a.actionId} of ${n.number} ${state === 'overdue' ? 'is overdue' : 'is due soon'}`,
    facts,
    ['When the action is done, record the done date and the evidence on the NCR page.'],
    ncrLink(publicUrl, n.id),
  );
  return { subject, text, html };
}

type FactsRow = {
  id: number;
  number: string;
  title: string;
  description: string;
  severity: NcrSeverity;
  status: NcrStatus;
  product_code: string | null;
  product_name: string | null;
  line_code: string | null;
  lot_numbers: string[];
  assignee_id: number | null;
  assignee_name: string | null;
  time_zone: string;
  date_format: PlantDateFormat;
};

/** The facts of NCRs as their messages tell them. */
export async function ncrMailFacts(tx: Pick<Database, 'execute'>, ncrIds: number[]): Promise<Map<number, NcrMailFacts & { assigneeId: number | null; clock: PlantClock }>> {
  const res = await tx.execute<FactsRow>(sql`
    select n.id, n.number, n.title, n.description, n.severity, n.status, p.code as product_code, p.name as product_name, pl.code as line_code,
      array(select l.lot_number from ncr_lots nl join lots l on l.id = nl.lot_id where nl.ncr_id = n.id order by l.lot_number) as lot_numbers,
      n.assignee_id, ua.name as assignee_name, pt.time_zone, pt.date_format
    from ncrs n join plants pt on pt.id = n.plant_id left join products p on p.id = n.product_id left join production_lines pl on pl.id = p.line_id
    left join users ua on ua.id = n.assignee_id
    where n.id = any(${arr(ncrIds)}::int[])`);
  return new Map(
    res.rows.map((r) => [
      r.id,
      {
        id: r.id,
        number: r.number,
        title: r.title,
        description: r.description,
        severity: r.severity,
        status: r.status,
        productCode: r.product_code,
        productName: r.product_name,
        lineCode: r.line_code,
        lotNumbers: r.lot_numbers,
        assigneeName: r.assignee_name,
        assigneeId: r.assignee_id,
        clock: { timeZone: r.time_zone, dateFormat: r.date_format },
      },
    ]),
  );
}

/**
 * Queues the message of an NCR's occasion in the deciding transaction, to its assignee and the active
 * immediate subscribers of its product or the product's line, once each. The dedupe key names the
 * transaction, so an NCR closed, reopened and closed again is told each time, and never twice for one change.
 */
export async function queueNcrMail(tx: Pick<Database, 'execute'>, o: { ncrId: number; occasion: NcrOccasion; actorName: string; reason?: string | null; publicUrl: string }): Promise<number> {
  const facts = (await ncrMailFacts(tx, [o.ncrId])).get(o.ncrId);
  if (!facts) return 0;
  const people = await tx.execute<{ id: number; email: string }>(sql`
    select distinct u.id, u.email from users u
    where u.active and (u.id = ${facts.assigneeId} or exists (
      select from alarm_subscriptions s join ncrs n on n.id = ${o.ncrId} join products p on p.id = n.product_id
      where s.user_id = u.id and s.immediate and (s.product_id = p.id or s.line_id = p.line_id)))
    order by u.id`);
  if (!people.rows.length) return 0;
  const txid = await tx.execute<{ txid: string }>(sql`select txid_current()::text as txid`);
  const composed = composeNcrMail(facts, o.occasion, { actorName: o.actorName, reason: o.reason }, o.publicUrl);
  return queueMail(
    tx,
    people.rows.map(
      (p): OutboxMail => ({
        kind: 'ncr',
        dedupeKey: `ncr:${o.ncrId}:${o.occasion}:tx${txid.rows[0].txid}:user:${p.id}`,
        to: { address: p.email, userId: p.id },
        ...composed,
        refs: { ncrId: o.ncrId },
      }),
    ),
  );
}
