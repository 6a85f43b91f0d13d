import type { RuleId } from '@shared/spc';

/** Short names of the run rules for tables and markers; the engine's descriptions explain them in full. */
export const ruleLabels: Record<RuleId, string> = {
  we1: 'Rule 1 · beyond a control limit',
  we2: 'Rule 2 · 2 of 3 beyond 2σ',
  we3: 'Rule 3 · 4 of 5 beyond 1σ',
  we4: 'Rule 4 · 8 on one side',
  trend: 'Trend · 6 rising or falling',
  alternating: 'Saw tooth · 14 alternating',
  hugging: 'Hugging · 15 within 1σ',
  mixture: 'Mixture · 8 avoiding the centre',
};

export const chartTypeLabels = {
  'xbar-r': 'X̄ and R chart',
  'xbar-s': 'X̄ and S chart',
  imr: 'Individuals and moving range chart',
} as const;

/** What the location and dispersion charts plot, by chart type. */
export const statisticNames = {
  'xbar-r': { location: 'X̄', dispersion: 'R', dispersionName: 'Range' },
  'xbar-s': { location: 'X̄', dispersion: 'S', dispersionName: 'Standard deviation' },
  imr: { location: 'I', dispersion: 'MR', dispersionName: 'Moving range' },
} as const;

export const ruleSetLabels = { we: 'Western Electric rules 1–4', extended: 'Western Electric rules and the extended set' } as const;

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
