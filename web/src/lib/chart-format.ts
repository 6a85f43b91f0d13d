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

/** Text for HTML built by hand (chart tooltips), with the five special characters escaped. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] as string);
}
