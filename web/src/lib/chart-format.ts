// The alarms feature still reads the rule names here; they live in @shared/spc with the rules.
export { ruleLabels } from '@shared/spc';

const shiftNames: Record<string, string> = { early: 'Early shift', late: 'Late shift', night: 'Night shift' };
export const shiftName = (shift: string | null): string => (shift ? (shiftNames[shift] ?? shift) : 'Shift not recorded');

/** A figure with a fixed number of decimals, or an en dash when there is none. */
export function figure(value: number | null | undefined, decimals: number): string {
  return value === null || value === undefined || !Number.isFinite(value) ? '–' : value.toFixed(decimals);
}

/** Indices such as Cpk read to two decimals. */
export const indexFigure = (value: number | null | undefined) => figure(value, 2);

const formats = new Map<string, Intl.DateTimeFormat>();
function formatIn(timeZone: string, kind: 'dateTime' | 'shortDate'): Intl.DateTimeFormat {
  const key = `${kind}|${timeZone}`;
  let format = formats.get(key);
  if (!format) {
    format = new Intl.DateTimeFormat(
      'en-GB',
      kind === 'dateTime'
        ? { timeZone, day: '2-digit', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }
        : { timeZone, day: '2-digit', month: 'short' },
    );
    formats.set(key, format);
  }
  return format;
}

/** Production times read in the plant's time zone, whatever the browser's: "30 Nov 2026, 06:15". */
export const formatDateTime = (iso: string, timeZone: string) => formatIn(timeZone, 'dateTime').format(new Date(iso));
/** "30 Nov", for axis labels. */
export const formatShortDate = (iso: string, timeZone: string) => formatIn(timeZone, 'shortDate').format(new Date(iso));

/** Text for HTML built by hand (chart tooltips), with the five special characters escaped. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] as string);
}
