// Production and test times are read and written in the plant's time zone, whatever the browser's.
import { wallClock } from '@shared/ingest/values';

const dateTimeFormats = new Map<string, Intl.DateTimeFormat>();

/** A timestamp from the API as plant time, e.g. "30 Nov 2026, 06:15". */
export function formatPlantDateTime(iso: string, timeZone: string): string {
  const value = new Date(iso);
  if (Number.isNaN(value.getTime())) return iso;
  let format = dateTimeFormats.get(timeZone);
  if (!format) {
    format = new Intl.DateTimeFormat('en-GB', { timeZone, day: '2-digit', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23' });
    dateTimeFormats.set(timeZone, format);
  }
  return format.format(value);
}

/** The wall-clock time in the plant as a datetime-local value, e.g. "2026-11-30T06:15". */
export function plantDateTimeInput(instant: Date, timeZone: string): string {
  const w = wallClock(instant.getTime(), timeZone);
  const two = (n: number) => String(n).padStart(2, '0');
  return `${w.year}-${two(w.month)}-${two(w.day)}T${two(w.hour)}:${two(w.minute)}`;
}
