// Reading cells the way lab exports write them: decimal commas, local date formats, stray spaces.

/** A number from a cell: "12.5", "12,5", " 1 234,5 " (space as thousands separator). null when not a number. */
export function parseNumber(cell: string, decimalComma: boolean): number | null {
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

/** Offset of a time zone from UTC in minutes at an instant, from the IANA data the runtime carries. */
export function zoneOffsetMinutes(utcMs: number, timeZone: string): number {
  const parts = new Intl.DateTimeFormat('en-GB', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
    second: '2-digit',
  }).formatToParts(new Date(utcMs));
  const get = (t: string) => Number(parts.find((p) => p.type === t)?.value);
  const asUtc = Date.UTC(get('year'), get('month') - 1, get('day'), get('hour'), get('minute'), get('second'));
  return Math.round((asUtc - Math.floor(utcMs / 1000) * 1000) / 60_000);
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

function validDate(y: number, mo: number, d: number, h: number, mi: number, s: number): boolean {
  const t = new Date(Date.UTC(y, mo - 1, d, h, mi, s));
  return t.getUTCFullYear() === y && t.getUTCMonth() === mo - 1 && t.getUTCDate() === d && h < 24 && mi < 60 && s < 60;
}

/**
 * A date-time from ISO 8601 or "dd.mm.yyyy HH:MM". Without an offset it is read as plant time.
 * Returns epoch milliseconds, or null when the text is not such a date.
 */
export function parsePlantDateTime(cell: string, timeZone: string): number | null {
  const text = cell.trim();
  let y: number, mo: number, d: number, h: number, mi: number, s: number, zone: string | undefined;
  const iso = isoPattern.exec(text);
  const eu = iso ? null : europeanPattern.exec(text);
  if (iso) {
    [y, mo, d, h, mi, s] = [iso[1], iso[2], iso[3], iso[4] ?? '0', iso[5] ?? '0', iso[6] ?? '0'].map(Number) as [number, number, number, number, number, number];
    zone = iso[7];
  } else if (eu) {
    [d, mo, y, h, mi, s] = [eu[1], eu[2], eu[3], eu[4] ?? '0', eu[5] ?? '0', eu[6] ?? '0'].map(Number) as [number, number, number, number, number, number];
  } else return null;
  if (!validDate(y, mo, d, h, mi, s)) return null;
  if (zone) {
    const offset = zone.toUpperCase() === 'Z' ? 0 : (zone[0] === '-' ? -1 : 1) * (Number(zone.slice(1, 3)) * 60 + Number(zone.slice(-2)));
    return Date.UTC(y, mo - 1, d, h, mi, s) - offset * 60_000;
  }
  return localToUtcMs(y, mo, d, h, mi, s, timeZone);
}

/** Cells that a spreadsheet would run as a formula. They are stored as text and never evaluated. */
export const looksLikeFormula = (cell: string) => /^[=+@\-\t\r]/.test(cell.trim()) && !/^[+-]?\d/.test(cell.trim());
