// The words of alarm e-mails and the morning digest: what happened, which lot, the value and the
// limit, and a link to the chart at the lot — as plain text and as simple HTML with the same content.
// One message tells every signal of a lot together; times are plant time, named once.
import { signalName, signalRank } from '@shared/spc';
import { formatPlantDate, formatPlantDateTime, plantTimeNote, type PlantClock } from '@shared/time';

export const JUDGEMENT_NOTE = 'Prismline supports the decision of trained staff; it does not replace their judgement, the product specification or the plant procedures.';

/** One signal of a lot as an e-mail tells it: the chart it is on, its figure against that chart's limit. */
export interface SignalFacts {
  alarmId: number;
  rule: string;
  characteristicId: number;
  characteristicCode: string;
  characteristicName: string;
  unit: string;
  decimals: number;
  /** The sentence of the alarm, in words and the characteristic's decimals. */
  description: string;
  lateReason: string | null;
  detectedAt: Date;
}

/** A lot and every signal one run (or one import) found on it. */
export interface LotMailFacts {
  lotId: number;
  lotNumber: string;
  producedAt: Date;
  shift: string | null;
  productCode: string;
  productName: string;
  lineCode: string | null;
  signals: SignalFacts[];
}

export interface Composed {
  subject: string;
  text: string;
  html: string;
}

export const escapeHtml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
const base = (publicUrl: string) => publicUrl.replace(/\/$/, '');

/** The chart at the lot, whatever period it shows (the chart page honours `lot=`). */
export const chartLink = (publicUrl: string, characteristicId: number, lotNumber: string) => `${base(publicUrl)}/charts/${characteristicId}?${new URLSearchParams({ lot: lotNumber })}`;
/** The lot's page, the same address as lotPath() of the web app. */
export const lotLink = (publicUrl: string, lotNumber: string) => `${base(publicUrl)}/results/lots/${encodeURIComponent(lotNumber)}`;

const bySeverity = (a: SignalFacts, b: SignalFacts) => signalRank(a.rule) - signalRank(b.rule) || a.characteristicCode.localeCompare(b.characteristicCode);

/** The signals of one lot, one line each: "HVL25-DENS · Density — Out of specification: Lot result …". */
function signalLines(lot: LotMailFacts): { head: string; text: string }[] {
  return [...lot.signals].sort(bySeverity).map((s) => ({
    head: `${s.characteristicCode} · ${s.characteristicName} — ${signalName(s.rule)}`,
    text: `${s.description}${s.lateReason ? ` ${s.lateReason}` : ''}`,
  }));
}

/** One e-mail for one lot: every signal found on it at once, the lot's production time in plant time. */
export function composeLotMail(lot: LotMailFacts, publicUrl: string, scope: string, clock: PlantClock): Composed {
  const signals = [...lot.signals].sort(bySeverity);
  const names = [...new Set(signals.map((s) => signalName(s.rule)))];
  const codes = [...new Set(signals.map((s) => s.characteristicCode))];
  const subject = `Prismline alarm: lot ${lot.lotNumber} — ${names.join(', ')} (${codes.join(', ')})`;
  const detected = signals.reduce((t, s) => Math.max(t, s.detectedAt.getTime()), 0);
  const facts: [string, string][] = [
    ['Product', `${lot.productCode} · ${lot.productName}${lot.lineCode ? ` (line ${lot.lineCode})` : ''}`],
    ['Lot', `${lot.lotNumber}, produced ${formatPlantDateTime(lot.producedAt, clock)}${lot.shift ? `, ${lot.shift} shift` : ''}`],
    ['Detected', formatPlantDateTime(detected, clock)],
    ['Lot page', lotLink(publicUrl, lot.lotNumber)],
  ];
  // A result out of specification puts the lot on hold in the transaction that raises the alarm
  // (api/lots/holds.ts): this message tells the hold too, so that one event makes one message.
  const outOfSpec = signals.some((s) => s.rule === 'out-of-spec');
  if (outOfSpec) facts.splice(2, 0, ['Status', 'On hold: a result outside the specification puts the lot on hold automatically; a quality manager releases it.']);
  const lines = signalLines(lot);
  const footer = [
    plantTimeNote(clock.timeZone, lot.producedAt) + '.',
    outOfSpec
      ? 'Check the lot and the test and decide whether there is an assignable cause; release the lot or raise an NCR on the lot page.'
      : 'Check the lot and the test, decide whether there is an assignable cause, and put the lot on hold if the specification requires it.',
    JUDGEMENT_NOTE,
    `You receive this because you subscribed to immediate alerts for ${scope}. Change your subscriptions in Prismline under Alerts by e-mail: ${base(publicUrl)}/subscriptions`,
  ];
  const heading = `${signals.length} signal${signals.length === 1 ? '' : 's'} on lot ${lot.lotNumber}`;
  const text = [
    heading,
    '',
    ...facts.map(([k, v]) => `${k}: ${v}`),
    '',
    ...lines.flatMap((l, i) => [`${i + 1}. ${l.head}`, `   ${l.text}`, `   Chart: ${chartLink(publicUrl, signals[i].characteristicId, lot.lotNumber)}`]),
    '',
    ...footer,
  ].join('\n');
  const html = [
    '<!doctype html><html><body style="font-family:sans-serif;font-size:14px;line-height:1.4">',
    `<h2 style="font-size:18px">${escapeHtml(heading)}</h2>`,
    '<table cellpadding="4" style="border-collapse:collapse">',
    ...facts.map(([k, v]) => `<tr><th align="left" valign="top">${escapeHtml(k)}</th><td>${k === 'Lot page' ? `<a href="${escapeHtml(v)}">${escapeHtml(v)}</a>` : escapeHtml(v)}</td></tr>`),
    '</table><ol>',
    ...lines.map(
      (l, i) =>
        `<li><strong>${escapeHtml(l.head)}</strong><br>${escapeHtml(l.text)} <a href="${escapeHtml(chartLink(publicUrl, signals[i].characteristicId, lot.lotNumber))}">Open the chart at this lot</a></li>`,
    ),
    '</ol>',
    ...footer.map((p) => `<p>${escapeHtml(p)}</p>`),
    '</body></html>',
  ].join('\n');
  return { subject, text, html };
}

/** One NCR as the digest lists it. */
export interface DigestNcr {
  id: number;
  number: string;
  title: string;
  severity: string;
  status: string;
  productCode: string | null;
}

/** One overdue NCR action as the digest lists it; `dueDate` is the plant's calendar day, YYYY-MM-DD. */
export interface DigestNcrAction {
  ncrId: number;
  ncrNumber: string;
  actionId: number;
  description: string;
  ownerName: string;
  dueDate: string;
}

/** The digest's NCR section: open NCRs, those raised in the period, overdue actions, each list bounded with its full count. */
export interface DigestNcrFacts {
  open: DigestNcr[];
  openCount: number;
  raised: DigestNcr[];
  raisedCount: number;
  overdue: DigestNcrAction[];
  overdueCount: number;
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;
const ncrPage = (publicUrl: string, id: number) => `${base(publicUrl)}/ncrs/${id}`;
const ncrLine = (n: DigestNcr) => `${n.number} (${n.severity}, ${n.status}${n.productCode ? `, ${n.productCode}` : ''}): ${n.title}`;
/** A plant calendar day in the plant's format: noon UTC of that day is that day in UTC. */
const dayText = (day: string, clock: PlantClock) => formatPlantDate(new Date(`${day}T12:00:00Z`), { timeZone: 'UTC', dateFormat: clock.dateFormat });
const actionLine = (a: DigestNcrAction, clock: PlantClock) => `Action #${a.actionId} of ${a.ncrNumber}, due ${dayText(a.dueDate, clock)}, owner ${a.ownerName}: ${a.description}`;
const more = (shown: number, count: number) => (count > shown ? [`  … and ${count - shown} more`] : []);

/** The NCR section as lines of text and as HTML. */
function ncrSection(n: DigestNcrFacts, publicUrl: string, clock: PlantClock): { text: string[]; html: string[] } {
  const text = [
    'Nonconformance reports',
    `  Raised in the period: ${n.raisedCount === 0 ? 'none' : n.raisedCount}`,
    ...n.raised.map((r) => `  - ${ncrLine(r)} ${ncrPage(publicUrl, r.id)}`),
    ...more(n.raised.length, n.raisedCount),
    `  Open now: ${n.openCount === 0 ? 'none' : n.openCount}`,
    ...n.open.map((r) => `  - ${ncrLine(r)} ${ncrPage(publicUrl, r.id)}`),
    ...more(n.open.length, n.openCount),
    `  Overdue actions: ${n.overdueCount === 0 ? 'none' : n.overdueCount}`,
    ...n.overdue.map((a) => `  - ${actionLine(a, clock)} ${ncrPage(publicUrl, a.ncrId)}`),
    ...more(n.overdue.length, n.overdueCount),
    '',
  ];
  const li = (label: string, href: string) => `<li><a href="${escapeHtml(href)}">${escapeHtml(label)}</a></li>`;
  const list = (items: string[], shown: number, count: number) => (items.length ? `<ul>${items.join('')}${count > shown ? `<li>… and ${count - shown} more</li>` : ''}</ul>` : '');
  const html = [
    '<h3 style="font-size:15px">Nonconformance reports</h3>',
    `<p>Raised in the period: ${n.raisedCount === 0 ? 'none' : n.raisedCount}</p>`,
    list(n.raised.map((r) => li(ncrLine(r), ncrPage(publicUrl, r.id))), n.raised.length, n.raisedCount),
    `<p>Open now: ${n.openCount === 0 ? 'none' : n.openCount}</p>`,
    list(n.open.map((r) => li(ncrLine(r), ncrPage(publicUrl, r.id))), n.open.length, n.openCount),
    `<p>Overdue actions: ${n.overdueCount === 0 ? 'none' : n.overdueCount}</p>`,
    list(n.overdue.map((a) => li(actionLine(a, clock), ncrPage(publicUrl, a.ncrId))), n.overdue.length, n.overdueCount),
  ];
  return { text, html };
}

/** The morning digest: the lots whose signals were detected in the period, each with its signals, then the NCRs when given. */
export function composeDigest(lots: LotMailFacts[], publicUrl: string, period: { from: Date; to: Date }, clock: PlantClock, ncrs?: DigestNcrFacts): Composed {
  const count = lots.reduce((n, l) => n + l.signals.length, 0);
  const ncrNews = ncrs ? [...(ncrs.raisedCount ? [`${plural(ncrs.raisedCount, 'NCR')} raised`] : []), ...(ncrs.overdueCount ? [`${plural(ncrs.overdueCount, 'NCR action')} overdue`] : [])] : [];
  const signalNews = count || !ncrNews.length ? `${count} new signal${count === 1 ? '' : 's'} on ${lots.length} lot${lots.length === 1 ? '' : 's'}` : 'no new signals';
  const subject = `Prismline morning digest ${formatPlantDate(period.to, clock)}: ${[signalNews, ...ncrNews].join('; ')}`;
  const section = ncrs ? ncrSection(ncrs, publicUrl, clock) : { text: [], html: [] };
  const intro = `Signals detected from ${formatPlantDateTime(period.from, clock)} to ${formatPlantDateTime(period.to, clock)}, newest lot first. ${plantTimeNote(clock.timeZone, period.to)}.`;
  const ordered = [...lots].sort((a, b) => b.producedAt.getTime() - a.producedAt.getTime() || a.lotNumber.localeCompare(b.lotNumber));
  const lotHead = (l: LotMailFacts) => `Lot ${l.lotNumber} (${l.productCode}, produced ${formatPlantDateTime(l.producedAt, clock)})`;
  const text = [
    intro,
    '',
    ...ordered.flatMap((l) => [lotHead(l), ...signalLines(l).map((s) => `  - ${s.head}: ${s.text}`), `  Lot page: ${lotLink(publicUrl, l.lotNumber)}`, '']),
    ...section.text,
    JUDGEMENT_NOTE,
    `Change your subscriptions in Prismline under Alerts by e-mail: ${base(publicUrl)}/subscriptions`,
  ].join('\n');
  const html = [
    '<!doctype html><html><body style="font-family:sans-serif;font-size:14px;line-height:1.4">',
    `<h2 style="font-size:18px">${escapeHtml(subject)}</h2><p>${escapeHtml(intro)}</p>`,
    ...ordered.map(
      (l) =>
        `<h3 style="font-size:15px"><a href="${escapeHtml(lotLink(publicUrl, l.lotNumber))}">${escapeHtml(lotHead(l))}</a></h3><ul>${[...l.signals]
          .sort(bySeverity)
          .map((s) => `<li><strong>${escapeHtml(`${s.characteristicCode} — ${signalName(s.rule)}`)}</strong>: ${escapeHtml(s.description)}${s.lateReason ? ` ${escapeHtml(s.lateReason)}` : ''} <a href="${escapeHtml(chartLink(publicUrl, s.characteristicId, l.lotNumber))}">Open the chart at this lot</a></li>`)
          .join('')}</ul>`,
    ),
    ...section.html,
    `<p>${escapeHtml(JUDGEMENT_NOTE)}</p>`,
    '</body></html>',
  ].join('\n');
  return { subject, text, html };
}
