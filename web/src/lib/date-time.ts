// Times on these pages are typed and shown in the browser's time zone, always with the zone named, and
// travel to the API as ISO 8601 with the offset that was in force at that moment.

const pad = (n: number, width = 2) => String(Math.abs(n)).padStart(width, '0');

/** The browser's IANA time zone, e.g. "Europe/Berlin". */
export function browserTimeZone(): string {
  return Intl.DateTimeFormat().resolvedOptions().timeZone;
}

/** An instant as the browser's wall-clock time with its offset, e.g. "2026-03-12T06:00:00+01:00". */
export function isoWithOffset(instant: Date): string {
  const offset = -instant.getTimezoneOffset();
  const sign = offset < 0 ? '-' : '+';
  const date = `${instant.getFullYear()}-${pad(instant.getMonth() + 1)}-${pad(instant.getDate())}`;
  const time = `${pad(instant.getHours())}:${pad(instant.getMinutes())}:${pad(instant.getSeconds())}`;
  return `${date}T${time}${sign}${pad(Math.trunc(offset / 60))}:${pad(offset % 60)}`;
}

/**
 * A datetime-local value ("2026-03-12T06:00") read in the browser's zone, as ISO with offset; undefined
 * for an empty field. A wall time skipped by a clock change comes out as the instant the browser takes
 * it for, so the offset always matches the instant.
 */
export function localInputToIso(input: string): string | undefined {
  const text = input.trim();
  if (!text) return undefined;
  // Without an offset, ECMAScript reads a date-time form as local time.
  const instant = new Date(text);
  return Number.isNaN(instant.getTime()) ? text : isoWithOffset(instant);
}

/** A date input's value ("2026-03-12") as the start of that day in the browser's zone. */
export function localDateToIso(input: string, daysLater = 0): string | undefined {
  const match = /^(\d{4})-(\d{2})-(\d{2})$/.exec(input.trim());
  if (!match) return undefined;
  return isoWithOffset(new Date(Number(match[1]), Number(match[2]) - 1, Number(match[3]) + daysLater));
}

/** Now, to the minute, as a datetime-local value. */
export function nowAsLocalInput(now = new Date()): string {
  return isoWithOffset(now).slice(0, 16);
}

const withZone = new Intl.DateTimeFormat('en-GB', {
  day: '2-digit',
  month: 'short',
  year: 'numeric',
  hour: '2-digit',
  minute: '2-digit',
  hourCycle: 'h23',
  timeZoneName: 'short',
});

/** A timestamp from the API in the browser's zone, with the zone: "12 Mar 2026, 06:00 CET". */
export function formatWithZone(iso: string): string {
  const value = new Date(iso);
  return Number.isNaN(value.getTime()) ? iso : withZone.format(value);
}
