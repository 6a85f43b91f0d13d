// The generator: six months of lab results for the plant's schedule, drawn from each characteristic's
// process model with the planted causes applied, and written as the canonical long upload CSV.
// Pure: no database, no files, no clock.
import { testMethod } from '@shared/lab';
import { type CharacteristicPlan, type LineCode, type ProductCode, type ShiftCode, plans } from './plant';
import { MINUTE, isSampled, plantDayNumber, plantIso, plantOffsetMinutes, productionSchedule, testedAt, windowStart } from './calendar';
import { mulberry32, normalSource } from './random';
import { causeWindows, outOfSpecLots, plantedEffect } from './causes';

/** One measurement in the canonical long upload format. */
export interface DemoResultRow {
  lot: string;
  product: ProductCode;
  line: LineCode;
  produced_at: string;
  characteristic: string;
  value: number;
  shift: ShiftCode;
  replicate: number;
  tested_at: string;
  operator: string;
  note?: string;
}

export interface GenerateOptions {
  endDate: Date;
  months?: number;
  seed?: number;
}

// Invented lab technicians by initials, two crews per shift alternating weekly.
const technicians: Record<ShiftCode, readonly [string, string]> = {
  early: ['AT', 'BM'],
  late: ['CR', 'DK'],
  night: ['EL', 'FN'],
};

function technicianAt(utcMs: number): string {
  const localHour = new Date(utcMs + plantOffsetMinutes(utcMs) * MINUTE).getUTCHours();
  const shift: ShiftCode = localHour >= 6 && localHour < 14 ? 'early' : localHour >= 14 && localHour < 22 ? 'late' : 'night';
  // A night shift after midnight belongs to the crew that started it the evening before.
  const day = plantDayNumber(utcMs) - (localHour < 6 ? 1 : 0);
  // Crews change on Mondays; day 0 (1970-01-01) was a Thursday.
  return technicians[shift][Math.floor((day + 3) / 7) % 2];
}

function roundTo(value: number, decimals: number): number {
  return Number(value.toFixed(decimals));
}

/**
 * Six months (by default) of lab results ending at endDate, the same for the same options.
 * Results whose test time would fall after endDate are not generated.
 */
export function generateDemoResults({ endDate, months = 6, seed = 20261201 }: GenerateOptions): DemoResultRow[] {
  const endMs = endDate.getTime();
  if (!Number.isFinite(endMs)) throw new RangeError('endDate must be a valid date');
  const startMs = windowStart(endMs, months);
  const lots = productionSchedule(startMs, endMs);
  const w = causeWindows(endMs);
  const oos = outOfSpecLots(lots, endMs);
  const normal = normalSource(mulberry32(seed));
  const byProduct = new Map<ProductCode, CharacteristicPlan[]>();
  for (const p of plans) byProduct.set(p.productCode, [...(byProduct.get(p.productCode) ?? []), p]);

  const rows: DemoResultRow[] = [];
  for (const lot of lots) {
    const producedIso = plantIso(lot.producedAt);
    for (const plan of byProduct.get(lot.product) ?? []) {
      const { mean, sigmaWithin, sigmaLot, sampling } = plan.model;
      if (!isSampled(lot, sampling)) continue;
      const tested = testedAt(lot, plan);
      if (tested > endMs) continue;

      const method = testMethod(plan.testMethodCode);
      const { add, factor, note } = plantedEffect(lot, plan, tested, w, oos);

      const { min, max, maxExclusive } = method.physicalRange;
      const step = 10 ** -method.decimals;
      const highest = maxExclusive ? max - step : max;
      const lotLevel = mean + sigmaLot * normal();
      const testedIso = plantIso(tested);
      const operator = technicianAt(tested);
      for (let r = 1; r <= plan.replicates; r++) {
        const raw = (lotLevel + sigmaWithin * normal()) * factor + add;
        const row: DemoResultRow = {
          lot: lot.code,
          product: lot.product,
          line: lot.line,
          produced_at: producedIso,
          characteristic: plan.code,
          value: roundTo(Math.min(highest, Math.max(min, raw)), method.decimals),
          shift: lot.shift,
          replicate: r,
          tested_at: testedIso,
          operator,
        };
        if (note && r === 1) row.note = note;
        rows.push(row);
      }
    }
  }
  return rows;
}

// ---------------------------------------------------------------------------------------------
// Canonical CSV
// ---------------------------------------------------------------------------------------------

export const canonicalCsvHeader = [
  'lot',
  'product',
  'line',
  'produced_at',
  'characteristic',
  'value',
  'shift',
  'replicate',
  'tested_at',
  'operator',
  'note',
] as const;

function csvField(value: string | number | undefined): string {
  if (value === undefined) return '';
  const text = String(value);
  return /[",\r\n]|^\s|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** Rows as CSV after RFC 4180: comma delimiter, dot decimals, CRLF line ends, quotes where needed. */
export function toCanonicalCsv(rows: readonly DemoResultRow[]): string {
  const lines = [canonicalCsvHeader.join(',')];
  for (const row of rows) lines.push(canonicalCsvHeader.map((k) => csvField(row[k])).join(','));
  return `${lines.join('\r\n')}\r\n`;
}
