// Reading cells the way lab exports write them: decimal commas, local date formats, stray spaces.

const plainDecimalPoint = /^-?\d{1,15}(?:\.\d{1,15})?$/;
const plainDecimalComma = /^-?\d{1,15}(?:,\d{1,15})?$/;

/** A number from a cell: "12.5", "12,5", " 1 234,5 " (space as thousands separator). null when not a number. */
export function parseNumber(cell: string, decimalComma: boolean): number | null {
  // Most cells are plain decimals: no need to look for spaces, grouping or exponents.
  if (decimalComma ? plainDecimalComma.test(cell) : plainDecimalPoint.test(cell)) return Number(decimalComma ? cell.replace(',', '.') : cell);
  let text = cell.trim().replace(/[\u00a0\u202f ]/g, '');
  if (text === '') return null;
  if (decimalComma) {
    if (/\d\.\d{3}(,|$)/.test(text) && text.includes(',')) text = text.replace(/\./g, '');
    text = text.replace(',', '.');
  }
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(text)) return null;
  const n = Number(text);
  return Number.isFinite(n) ? n : null;
}

const wallClockFormats = new Map<string, Intl.DateTimeFormat>();

/** The wall-clock reading of an instant in a time zone, from the IANA data the runtime carries. */
export function wallClock(utcMs: number, timeZone: string): { year: number; month: number; day: number; hour: number; minute: number; second: number } {
  let format = wallClockFormats.get(timeZone);
  if (!format) {
    format = new Intl.DateTimeFormat('en-GB', { timeZone, hourCycle: 'h23', year: 'numeric', month: '2-digit', day: '2-digit', hour: '2-digit', minute: '2-digit', second: '2-digit' });
    wallClockFormats.set(timeZone, format);
  }
  const parts = format.formatToParts(new Date(utcMs));
  const get = (t: Intl.DateTimeFormatPartTypes) => Number(parts.find((p) => p.type === t)?.value);
  return { year: get('year'), month: get('month'), day: get('day'), hour: get('hour'), minute: get('minute'), second: get('second') };
}

function offsetFromWallClock(utcMs: number, timeZone: string): number {
  const w = wallClock(utcMs, timeZone);
  const asUtc = Date.UTC(w.year, w.month - 1, w.day, w.hour, w.minute, w.second);
  return Math.round((asUtc - Math.floor(utcMs / 1000) * 1000) / 60_000);
}

const HOUR = 3_600_000;
/** Per zone, the offset of each UTC hour that has no change of offset inside it. */
const steadyHours = new Map<string, Map<number, number>>();

/**
 * Offset of a time zone from UTC in minutes at an instant. Asking the runtime's zone data costs
 * microseconds and a large file asks twice a row, so an hour whose two ends agree is remembered
 * (no zone changes its offset twice within an hour).
 */
export function zoneOffsetMinutes(utcMs: number, timeZone: string): number {
  const hour = Math.floor(utcMs / HOUR);
  let hours = steadyHours.get(timeZone);
  const known = hours?.get(hour);
  if (known !== undefined) return known;
  const exact = offsetFromWallClock(utcMs, timeZone);
  const first = offsetFromWallClock(hour * HOUR, timeZone);
  if (first === offsetFromWallClock((hour + 1) * HOUR - 1000, timeZone) && first === exact) {
    if (!hours || hours.size > 100_000) steadyHours.set(timeZone, (hours = new Map()));
    hours.set(hour, exact);
  }
  return exact;
}

/** The instant of a wall-clock time in a zone. In the autumn overlap the earlier instant is taken. */
export function localToUtcMs(y: number, mo: number, d: number, h: number, mi: number, s: number, timeZone: string): number {
  const wall = Date.UTC(y, mo - 1, d, h, mi, s);
  let guess = wall - zoneOffsetMinutes(wall, timeZone) * 60_000;
  guess = wall - zoneOffsetMinutes(guess, timeZone) * 60_000;
  const earlier = wall - zoneOffsetMinutes(guess - 3_600_000, timeZone) * 60_000;
  return zoneOffsetMinutes(earlier, timeZone) * 60_000 === wall - earlier ? Math.min(earlier, guess) : guess;
}

const isoPattern = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.\d+)?)?)?\s*(Z|[+-]\d{2}:?\d{2})?$/i;
const europeanPattern = /^(\d{1,2})\.(\d{1,2})\.(\d{4})(?:\s+(\d{1,2}):(\d{2})(?::(\d{2}))?)?$/;

const daysInMonth = (y: number, mo: number) => (mo === 2 ? (y % 4 === 0 && (y % 100 !== 0 || y % 400 === 0) ? 29 : 28) : [4, 6, 9, 11].includes(mo) ? 30 : 31);

function validDate(y: number, mo: number, d: number, h: number, mi: number, s: number): boolean {
  return y >= 1900 && y <= 2999 && mo >= 1 && mo <= 12 && d >= 1 && d <= daysInMonth(y, mo) && h < 24 && mi < 60 && s < 60;
}

/** The number written by text[at, at + count) in decimal digits, or -1. */
function digitsAt(text: string, at: number, count: number): number {
  let value = 0;
  for (let i = at; i < at + count; i++) {
    const d = text.charCodeAt(i) - 48;
    if (d < 0 || d > 9) return -1;
    value = value * 10 + d;
  }
  return value;
}

/**
 * The common shapes of an ISO 8601 date-time read character by character, without a regular expression:
 * "2026-11-30T06:15", optional ":SS" and fraction, optional "Z" or "±HH:MM". Undefined for any other
 * shape, which the general reading below then takes.
 */
function isoDateTimeQuickly(text: string, timeZone: string): number | null | undefined {
  const n = text.length;
  if (n < 16 || text.charCodeAt(4) !== 45 || text.charCodeAt(7) !== 45 || text.charCodeAt(13) !== 58) return undefined;
  const separator = text.charCodeAt(10);
  if (separator !== 84 && separator !== 32) return undefined;
  const y = digitsAt(text, 0, 4);
  const mo = digitsAt(text, 5, 2);
  const d = digitsAt(text, 8, 2);
  const h = digitsAt(text, 11, 2);
  const mi = digitsAt(text, 14, 2);
  if (y < 0 || mo < 0 || d < 0 || h < 0 || mi < 0) return undefined;
  let i = 16;
  let s = 0;
  if (i < n && text.charCodeAt(i) === 58) {
    s = digitsAt(text, i + 1, 2);
    if (s < 0) return undefined;
    i += 3;
    if (i < n && text.charCodeAt(i) === 46) {
      const first = ++i;
      while (i < n && text.charCodeAt(i) >= 48 && text.charCodeAt(i) <= 57) i++;
      if (i === first) return undefined;
    }
  }
  let offsetMinutes: number | null = null;
  if (i === n - 1 && text.charCodeAt(i) === 90) offsetMinutes = 0;
  else if (i < n) {
    const sign = text.charCodeAt(i);
    if ((sign !== 43 && sign !== 45) || !(n - i === 6 ? text.charCodeAt(i + 3) === 58 : n - i === 5)) return undefined;
    const oh = digitsAt(text, i + 1, 2);
    const om = digitsAt(text, n - 2, 2);
    if (oh < 0 || om < 0) return undefined;
    offsetMinutes = (sign === 45 ? -1 : 1) * (oh * 60 + om);
  }
  if (!validDate(y, mo, d, h, mi, s)) return null;
  return offsetMinutes === null ? localToUtcMs(y, mo, d, h, mi, s, timeZone) : Date.UTC(y, mo - 1, d, h, mi, s) - offsetMinutes * 60_000;
}

/**
 * A date-time from ISO 8601 or "dd.mm.yyyy HH:MM". Without an offset it is read as plant time.
 * Returns epoch milliseconds, or null when the text is not such a date.
 */
export function parsePlantDateTime(cell: string, timeZone: string): number | null {
  const text = cell.trim();
  const quick = isoDateTimeQuickly(text, timeZone);
  if (quick !== undefined) return quick;
  const iso = isoPattern.exec(text);
  const eu = iso ? null : europeanPattern.exec(text);
  const m = iso ?? eu;
  if (!m) return null;
  // Group order differs: ISO is year-month-day, the European form day.month.year.
  const y = Number(iso ? m[1] : m[3]);
  const mo = Number(m[2]);
  const d = Number(iso ? m[3] : m[1]);
  const h = Number(m[4] ?? 0);
  const mi = Number(m[5] ?? 0);
  const s = Number(m[6] ?? 0);
  if (!validDate(y, mo, d, h, mi, s)) return null;
  const zone = iso ? iso[7] : undefined;
  if (zone) {
    const offset = zone.toUpperCase() === 'Z' ? 0 : (zone[0] === '-' ? -1 : 1) * (Number(zone.slice(1, 3)) * 60 + Number(zone.slice(-2)));
    return Date.UTC(y, mo - 1, d, h, mi, s) - offset * 60_000;
  }
  return localToUtcMs(y, mo, d, h, mi, s, timeZone);
}

/** Whether a cell that is not a date is written like one (a day or time that does not exist, such as 31.02.) */
export function looksLikeDate(cell: string): boolean {
  const text = cell.trim();
  return isoPattern.test(text) || europeanPattern.test(text);
}

/** Cells that a spreadsheet would run as a formula. They are stored as text and never evaluated. */
export const looksLikeFormula = (cell: string) => /^[=+@\-\t\r]/.test(cell.trim()) && !/^[+-]?\d/.test(cell.trim());
