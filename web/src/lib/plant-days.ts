import { formatPlantDate, readPlantDate, type PlantClock } from '@shared/time';

// Due and done dates (NCR actions) are plant calendar days (YYYY-MM-DD), not instants: they are shown in the
// plant's date format without passing through any zone, and a typed day is taken as the plant's day it names.

const isoDay = /^\d{4}-\d{2}-\d{2}$/;

/** "2026-12-05" as the plant writes it ("05/12/2026"); a text that is no such day is shown as it is. */
export function formatPlantDay(day: string, clock: PlantClock): string {
  if (!isoDay.test(day)) return day;
  const start = readPlantDate(day, { timeZone: clock.timeZone, dateFormat: 'yyyy-MM-dd' });
  return start ? formatPlantDate(start, clock) : day;
}

/**
 * The plant day of what a plant date field gives (`plantDateText('date', …)`: ISO 8601 written in the plant's
 * zone with its offset, "2026-12-05T00:00:00+00:00"): its first ten characters are the plant's calendar day.
 */
export function plantDayOf(plantIso: string): string {
  return plantIso.slice(0, 10);
}
