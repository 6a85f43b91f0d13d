// The plant's calendar: its clock (Europe/London, so the data crosses clock changes), the shifts and
// campaigns that make the production schedule, and when each lot's sample is tested.
import { type CharacteristicPlan, type LineCode, type ProductCode, type Sampling, type ShiftCode, lines, shifts } from './plant';
import { hash32, mulberry32 } from './random';

export const MINUTE = 60_000;
export const HOUR = 60 * MINUTE;
export const DAY = 24 * HOUR;

/** 01:00 UTC on the last Sunday of a month, when UK clocks change. */
function lastSundayAt0100Utc(year: number, monthIndex: number): number {
  const lastDay = new Date(Date.UTC(year, monthIndex + 1, 0));
  return Date.UTC(year, monthIndex, lastDay.getUTCDate() - lastDay.getUTCDay(), 1);
}

/** Offset of the plant clock from UTC in minutes at an instant: 60 in summer time, else 0. */
export function plantOffsetMinutes(utcMs: number): number {
  const year = new Date(utcMs).getUTCFullYear();
  return utcMs >= lastSundayAt0100Utc(year, 2) && utcMs < lastSundayAt0100Utc(year, 9) ? 60 : 0;
}

/** The instant of a plant-clock wall time (our shifts never start inside the spring-forward hour). */
function plantWallToUtc(year: number, monthIndex: number, day: number, hour: number): number {
  const naive = Date.UTC(year, monthIndex, day, hour);
  const guess = naive - plantOffsetMinutes(naive) * MINUTE;
  return naive - plantOffsetMinutes(guess) * MINUTE;
}

const pad = (n: number, w = 2) => String(n).padStart(w, '0');

/** ISO 8601 with the plant's offset, e.g. 2026-11-04T07:12:00+00:00. */
export function plantIso(utcMs: number): string {
  const offset = plantOffsetMinutes(utcMs);
  const d = new Date(utcMs + offset * MINUTE);
  return (
    `${d.getUTCFullYear()}-${pad(d.getUTCMonth() + 1)}-${pad(d.getUTCDate())}` +
    `T${pad(d.getUTCHours())}:${pad(d.getUTCMinutes())}:${pad(d.getUTCSeconds())}` +
    `+${pad(offset / 60)}:00`
  );
}

/** Plant-clock calendar date of an instant, as a UTC-midnight day number (days since 1970-01-01). */
export function plantDayNumber(utcMs: number): number {
  return Math.floor((utcMs + plantOffsetMinutes(utcMs) * MINUTE) / DAY);
}

/** Instant of a plant-clock hour on the plant day `daysBefore` days before the day of `endMs`. */
export function plantTime(endMs: number, daysBefore: number, hour: number): number {
  const d = new Date((plantDayNumber(endMs) - daysBefore) * DAY);
  return plantWallToUtc(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate(), hour);
}

/** The hour of the plant clock at which the quality manager's decisions are dated: a working morning. */
export const DECISION_HOUR = 10;

/**
 * When the quality manager acts on something that happened at `afterMs`: 10:00 plant time on the
 * first Monday to Friday after that plant day (the manager reviews the charts each working morning).
 */
export function nextWorkingMorning(afterMs: number): number {
  for (let day = plantDayNumber(afterMs) + 1; ; day++) {
    const date = new Date(day * DAY);
    const weekday = date.getUTCDay();
    if (weekday === 0 || weekday === 6) continue;
    return plantWallToUtc(date.getUTCFullYear(), date.getUTCMonth(), date.getUTCDate(), DECISION_HOUR);
  }
}

/** Days before the end of the history on which the products' specifications were issued, from their data sheets. */
export const SPECIFICATION_DAYS_BEFORE = 200;

/** When the first specification revision of every characteristic was issued and took effect: 09:00 plant time, before the history begins. */
export function specificationIssuedAt(endMs: number): number {
  return plantTime(endMs, SPECIFICATION_DAYS_BEFORE, 9);
}

export interface Lot {
  code: string;
  line: LineCode;
  product: ProductCode;
  shift: ShiftCode;
  producedAt: number;
  firstOfShift: boolean;
  firstOfDay: boolean;
}

const lotsPerShift = 2;
const shiftLetter: Record<ShiftCode, string> = { early: 'E', late: 'L', night: 'N' };

/** Monday to Saturday run three shifts; on Sunday only the night shift into Monday runs. */
function shiftRuns(weekday: number, shift: ShiftCode): boolean {
  return weekday !== 0 || shift === 'night';
}

/** Campaigns by weekday: HV Level Fine on Wednesdays and Saturdays, HV Patch R3 on Tuesdays and Fridays. */
function productOn(line: LineCode, weekday: number): ProductCode {
  if (line === 'L1') return weekday === 3 || weekday === 6 ? 'HVLF' : 'HVL25';
  return weekday === 2 || weekday === 5 ? 'HVR3' : 'HVFX';
}

export function windowStart(endMs: number, months: number): number {
  const d = new Date(endMs);
  d.setUTCMonth(d.getUTCMonth() - months);
  return d.getTime();
}

/** Every lot produced in [start, end), in order of production. Depends on the dates only. */
export function productionSchedule(startMs: number, endMs: number): Lot[] {
  const lots: Lot[] = [];
  for (let day = plantDayNumber(startMs) - 1; day <= plantDayNumber(endMs); day++) {
    const date = new Date(day * DAY);
    const [y, m, d, weekday] = [date.getUTCFullYear(), date.getUTCMonth(), date.getUTCDate(), date.getUTCDay()];
    const ymd = `${pad(y % 100)}${pad(m + 1)}${pad(d)}`;
    for (const line of lines) {
      const product = productOn(line.code, weekday);
      let firstOfDay = true;
      for (const shift of shifts) {
        if (!shiftRuns(weekday, shift.code)) continue;
        const begins = plantWallToUtc(y, m, d, shift.startHour);
        const ends = plantWallToUtc(y, m, d + (shift.endHour < shift.startHour ? 1 : 0), shift.endHour);
        const slot = (ends - begins) / lotsPerShift;
        for (let k = 0; k < lotsPerShift; k++) {
          const code = `${line.code}-${ymd}-${shiftLetter[shift.code]}${k + 1}`;
          const jitter = (mulberry32(hash32(code))() - 0.5) * 40 * MINUTE;
          const producedAt = Math.round((begins + (k + 0.5) * slot + jitter) / MINUTE) * MINUTE;
          if (producedAt < startMs || producedAt >= endMs) continue;
          lots.push({ code, line: line.code, product, shift: shift.code, producedAt, firstOfShift: k === 0, firstOfDay });
          firstOfDay = false;
        }
      }
    }
  }
  return lots.sort((a, b) => a.producedAt - b.producedAt || a.code.localeCompare(b.code));
}

export function isSampled(lot: Lot, sampling: Sampling): boolean {
  if (sampling === 'each-lot') return true;
  return sampling === 'first-lot-of-shift' ? lot.firstOfShift : lot.firstOfDay;
}

/** When a lot's fresh sample is mixed and, for hardened tests, when its specimens are cast. */
function freshTestAt(lot: Lot): number {
  return lot.producedAt + (30 + (hash32(`${lot.code}/mix`) % 31)) * MINUTE;
}

export function testedAt(lot: Lot, plan: CharacteristicPlan): number {
  const mixed = freshTestAt(lot);
  if (plan.ageDays === null) return mixed + plan.model.offsetMinutes * MINUTE;
  return mixed + 15 * MINUTE + plan.ageDays * DAY + plan.model.offsetMinutes * MINUTE;
}
