// The plant's clock: every time a person reads or types is the plant's wall-clock time, in the plant's
// date format, with the zone named. Web pages, e-mails and exports all format through here, so a
// process event reads the same hour on the chart, in the list and in the CSV.
import { format, isValid, parse } from 'date-fns';
import { tz } from '@date-fns/tz';

/** Date formats a plant may choose (date-fns tokens). Day-first is the default: the demo plant is in Britain. */
export const PLANT_DATE_FORMATS = ['dd/MM/yyyy', 'dd.MM.yyyy', 'yyyy-MM-dd', 'MM/dd/yyyy'] as const;
export type PlantDateFormat = (typeof PLANT_DATE_FORMATS)[number];
export const DEFAULT_PLANT_DATE_FORMAT: PlantDateFormat = 'dd/MM/yyyy';

/** The plant's zone and date format: all it takes to show or read a time the way the plant does. */
export interface PlantClock {
  /** IANA zone, e.g. "Europe/London". */
  timeZone: string;
  dateFormat: PlantDateFormat;
}

/** The clock a page uses until the plant's own has loaded (and for a database with no plant yet). */
export const FALLBACK_PLANT_CLOCK: PlantClock = { timeZone: 'UTC', dateFormat: DEFAULT_PLANT_DATE_FORMAT };

/** How a user types a date in the plant's format, e.g. "dd/mm/yyyy" (a placeholder and an error message). */
export function dateFormatHint(dateFormat: PlantDateFormat): string {
  return dateFormat.toLowerCase();
}

type Instant = Date | string | number;

function toDate(instant: Instant): Date {
  return instant instanceof Date ? instant : new Date(instant);
}

function formatIn(instant: Instant, pattern: string, timeZone: string): string {
  const date = toDate(instant);
  if (!isValid(date)) return typeof instant === 'string' ? instant : '';
  return format(date, pattern, { in: tz(timeZone) });
}

/** An instant as plant date and time, e.g. "30/11/2026 06:15". */
export function formatPlantDateTime(instant: Instant, clock: PlantClock): string {
  return formatIn(instant, `${clock.dateFormat} HH:mm`, clock.timeZone);
}

/** An instant as plant date only, e.g. "30/11/2026". */
export function formatPlantDate(instant: Instant, clock: PlantClock): string {
  return formatIn(instant, clock.dateFormat, clock.timeZone);
}

/** An instant as plant time of day, e.g. "06:15". */
export function formatPlantTime(instant: Instant, timeZone: string): string {
  return formatIn(instant, 'HH:mm', timeZone);
}

/** The plant's calendar day of an instant as ISO, e.g. "2026-11-30" (keys, file names, digests). */
export function plantDay(instant: Instant, timeZone: string): string {
  return formatIn(instant, 'yyyy-MM-dd', timeZone);
}

/**
 * An instant as ISO 8601 in plant time with its offset, e.g. "2026-11-30T06:15:00+00:00": what exports
 * write, so a spreadsheet shows the plant's hour and a program still reads the exact instant.
 */
export function plantIso(instant: Instant, timeZone: string): string {
  return formatIn(instant, "yyyy-MM-dd'T'HH:mm:ssxxx", timeZone);
}

/** The zone's short name at an instant, e.g. "GMT" or "BST" for Europe/London. */
export function zoneAbbreviation(timeZone: string, at: Instant = Date.now()): string {
  const parts = new Intl.DateTimeFormat('en-GB', { timeZone, timeZoneName: 'short' }).formatToParts(toDate(at));
  return parts.find((p) => p.type === 'timeZoneName')?.value ?? timeZone;
}

/** How a page names its clock once: "Times are plant time (Europe/London, GMT)". */
export function plantTimeNote(timeZone: string, at: Instant = Date.now()): string {
  return `Times are plant time (${timeZone}, ${zoneAbbreviation(timeZone, at)})`;
}

/** A date typed in the plant's format, as the instant the plant's day starts; null when it is not such a date. */
export function readPlantDate(text: string, clock: PlantClock): Date | null {
  return readIn(text.trim(), clock.dateFormat, clock.timeZone);
}

/** A date and time typed in the plant's format ("30/11/2026 06:15"), as an instant; null when unreadable. */
export function readPlantDateTime(text: string, clock: PlantClock): Date | null {
  const trimmed = text.trim().replace(/\s+/g, ' ');
  return readIn(trimmed, `${clock.dateFormat} HH:mm`, clock.timeZone) ?? readIn(trimmed, `${clock.dateFormat} HH:mm:ss`, clock.timeZone);
}

function readIn(text: string, pattern: string, timeZone: string): Date | null {
  if (!text) return null;
  const read = parse(text, pattern, new Date(0), { in: tz(timeZone) });
  if (!isValid(read)) return null;
  // date-fns accepts "1/2/2026" for "dd/MM/yyyy" and years of any length; a plant record wants four digits.
  if (!/\d{4}/.test(text)) return null;
  // A wall time the autumn clock change repeats names two instants; take the earlier, as the import does.
  const hourEarlier = read.getTime() - 3_600_000;
  return format(hourEarlier, pattern, { in: tz(timeZone) }) === format(read, pattern, { in: tz(timeZone) }) ? new Date(hourEarlier) : new Date(read.getTime());
}


// Due and done dates (NCR actions) are plant calendar days (YYYY-MM-DD), not instants: they are shown in the
// plant's date format without passing through any zone.
const isoDay = /^\d{4}-\d{2}-\d{2}$/;

/** "2026-12-05" as the plant writes it ("05/12/2026"); a text that is no such day is shown as it is. */
export function formatPlantDay(day: string, clock: PlantClock): string {
  if (!isoDay.test(day)) return day;
  const start = readPlantDate(day, { timeZone: clock.timeZone, dateFormat: 'yyyy-MM-dd' });
  return start ? formatPlantDate(start, clock) : day;
}

