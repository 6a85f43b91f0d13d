// The words of alarm e-mails and the morning digest: what happened, which lot, the value and the
// limit, and a link to the chart — as plain text and as simple HTML with the same content.
import type { Finding } from '../spc/alarms';

/** Short names of the signals, in the trade's words. */
export const signalNames: Record<string, string> = {
  'out-of-spec': 'Out of specification',
  we1: 'Beyond a control limit',
  we2: 'Two of three beyond 2 sigma',
  we3: 'Four of five beyond 1 sigma',
  we4: 'Eight on one side of the centre line',
  trend: 'Six in a row rising or falling',
  alternating: 'Fourteen alternating up and down',
  hugging: 'Fifteen within 1 sigma',
  mixture: 'Eight beyond 1 sigma on both sides',
};

export const JUDGEMENT_NOTE = 'Prismline supports the decision of trained staff; it does not replace their judgement, the product specification or the plant procedures.';

/** An alarm as its finding describes it, with the characteristic, product and lot it concerns. */
export interface AlarmMailFacts extends Pick<Finding, 'pointIndex' | 'statistic' | 'values' | 'limitName' | 'limitValue' | 'description' | 'lateReason'> {
  alarmId: number;
  rule: string;
  characteristicId: number;
  characteristicCode: string;
  characteristicName: string;
  unit: string;
  decimals: number;
  productCode: string;
  productName: string;
  lineCode: string | null;
  lotNumber: string;
  producedAt: Date;
  shift: string | null;
}

export interface Composed {
  subject: string;
  text: string;
  html: string;
}

const escapeHtml = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
const fmt = (v: number, d: number) => v.toFixed(Math.max(0, Math.min(6, d)));
const when = (d: Date) => `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;

export const chartLink = (publicUrl: string, characteristicId: number, pointIndex: number) => `${publicUrl.replace(/\/$/, '')}/charts/${characteristicId}?point=${pointIndex}`;

const limitWords: Record<string, string> = {
  UCL: 'upper control limit (UCL)',
  LCL: 'lower control limit (LCL)',
  USL: 'upper specification limit (USL)',
  LSL: 'lower specification limit (LSL)',
};

export function composeAlarmMail(f: AlarmMailFacts, publicUrl: string, scope: string): Composed {
  const signal = signalNames[f.rule] ?? f.rule;
  const link = chartLink(publicUrl, f.characteristicId, f.pointIndex);
  const rows: [string, string][] = [
    ['What happened', f.description],
    ['Characteristic', `${f.characteristicCode} · ${f.characteristicName}`],
    ['Product', `${f.productCode} · ${f.productName}${f.lineCode ? ` (line ${f.lineCode})` : ''}`],
    ['Lot', `${f.lotNumber}, produced ${when(f.producedAt)}${f.shift ? `, ${f.shift} shift` : ''}`],
    ['Values', `${f.values.map((v) => fmt(v, f.decimals)).join(', ')} ${f.unit}`],
    ['Plotted value', `${fmt(f.statistic, f.decimals + 1)} ${f.unit}`],
  ];
  if (f.limitName && f.limitValue !== null) rows.push(['Limit', `${limitWords[f.limitName] ?? f.limitName} ${fmt(f.limitValue, f.decimals + 1)} ${f.unit}`]);
  if (f.lateReason) rows.push(['Position', f.lateReason]);
  rows.push(['Chart', link]);
  const subject = `Prismline alarm: ${signal} — ${f.characteristicCode}, lot ${f.lotNumber}`;
  const footer = [
    'Check the lot and the test, decide whether there is an assignable cause, and put the lot on hold if the specification requires it.',
    JUDGEMENT_NOTE,
    `You receive this because you subscribed to immediate alerts for ${scope}. Change your subscriptions in Prismline under Alerts by e-mail: ${publicUrl.replace(/\/$/, '')}/subscriptions`,
  ];
  const text = [`${signal}`, '', ...rows.map(([k, v]) => `${k}: ${v}`), '', ...footer].join('\n');
  const html = [
    '<!doctype html><html><body style="font-family:sans-serif;font-size:14px;line-height:1.4">',
    `<h2 style="font-size:18px">${escapeHtml(signal)}</h2>`,
    '<table cellpadding="4" style="border-collapse:collapse">',
    ...rows.map(([k, v]) => `<tr><th align="left" valign="top">${escapeHtml(k)}</th><td>${k === 'Chart' ? `<a href="${escapeHtml(v)}">${escapeHtml(v)}</a>` : escapeHtml(v)}</td></tr>`),
    '</table>',
    ...footer.map((p) => `<p>${escapeHtml(p)}</p>`),
    '</body></html>',
  ].join('\n');
  return { subject, text, html };
}

export interface DigestEntry extends AlarmMailFacts {
  createdAt: Date;
}

export function composeDigest(entries: DigestEntry[], publicUrl: string, period: { from: Date; to: Date }, localDate: string): Composed {
  const byCharacteristic = new Map<string, DigestEntry[]>();
  for (const e of entries) {
    const key = `${e.characteristicCode} · ${e.characteristicName} (${e.productCode})`;
    byCharacteristic.set(key, [...(byCharacteristic.get(key) ?? []), e]);
  }
  const subject = `Prismline morning digest ${localDate}: ${entries.length} new alarm${entries.length === 1 ? '' : 's'}`;
  const intro = `New alarms from ${when(period.from)} to ${when(period.to)}, by characteristic.`;
  const line = (e: DigestEntry) => `${signalNames[e.rule] ?? e.rule} — lot ${e.lotNumber}: ${e.description}${e.lateReason ? ` ${e.lateReason}` : ''} Chart: ${chartLink(publicUrl, e.characteristicId, e.pointIndex)}`;
  const text = [
    intro,
    '',
    ...[...byCharacteristic].flatMap(([k, list]) => [k, ...list.map((e) => `  - ${line(e)}`), '']),
    JUDGEMENT_NOTE,
    `Change your subscriptions in Prismline under Alerts by e-mail: ${publicUrl.replace(/\/$/, '')}/subscriptions`,
  ].join('\n');
  const html = [
    '<!doctype html><html><body style="font-family:sans-serif;font-size:14px;line-height:1.4">',
    `<h2 style="font-size:18px">${escapeHtml(subject)}</h2><p>${escapeHtml(intro)}</p>`,
    ...[...byCharacteristic].map(
      ([k, list]) =>
        `<h3 style="font-size:15px">${escapeHtml(k)}</h3><ul>${list
          .map((e) => `<li><strong>${escapeHtml(signalNames[e.rule] ?? e.rule)}</strong> — lot ${escapeHtml(e.lotNumber)}: ${escapeHtml(e.description)}${e.lateReason ? ` ${escapeHtml(e.lateReason)}` : ''} <a href="${escapeHtml(chartLink(publicUrl, e.characteristicId, e.pointIndex))}">Open the chart</a></li>`)
          .join('')}</ul>`,
    ),
    `<p>${escapeHtml(JUDGEMENT_NOTE)}</p>`,
    '</body></html>',
  ].join('\n');
  return { subject, text, html };
}
