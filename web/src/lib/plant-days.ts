export { formatPlantDay } from '@shared/time';

// Due and done dates (NCR actions) are plant calendar days (YYYY-MM-DD), not instants: they are shown in the
// plant's date format without passing through any zone, and a typed day is taken as the plant's day it names.

/**
 * The plant day of what a plant date field gives (`plantDateText('date', …)`: ISO 8601 written in the plant's
 * zone with its offset, "2026-12-05T00:00:00+00:00"): its first ten characters are the plant's calendar day.
 */
export function plantDayOf(plantIso: string): string {
  return plantIso.slice(0, 10);
}
