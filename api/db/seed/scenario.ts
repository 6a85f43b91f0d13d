/**
 * The invented demo scenario: Harrow Vale Mortar Works, one dry-mix plant with two lines, and a
 * deterministic generator for six months of lab results in the canonical long upload format.
 * Pure data and functions: no database, no files, no clock. Every number here is invented for
 * the demo; spec limits follow the declared classes and common practice, not any real product.
 */
import { type TestMethodCode, testMethod } from '@shared/lab';
import { suggestedChartType } from '@shared/schemas/catalogue';

// ---------------------------------------------------------------------------------------------
// Plant, lines, shifts, products
// ---------------------------------------------------------------------------------------------

/**
 * The plant is invented. Its clock is Europe/London (UK summer time from the last Sunday of March
 * to the last Sunday of October, changing at 01:00 UTC), so the data crosses clock changes.
 */
export const plant = {
  code: 'HVMW',
  name: 'Harrow Vale Mortar Works',
  timeZone: 'Europe/London',
} as const;

export type LineCode = 'L1' | 'L2';
export type ProductCode = 'HVL25' | 'HVLF' | 'HVFX' | 'HVR3';
export type ProductFamily = 'levelling' | 'tile-adhesive' | 'repair';
export type ShiftCode = 'early' | 'late' | 'night';

export interface Line {
  code: LineCode;
  name: string;
}

export interface Product {
  code: ProductCode;
  name: string;
  family: ProductFamily;
  /** Declared class: EN 13813 for screeds, EN 12004 for tile adhesives, EN 1504-3 for repair mortars. */
  declaredClass: string;
  lineCode: LineCode;
}

export interface Shift {
  code: ShiftCode;
  name: string;
  /** Plant-clock hours; the night shift ends at 06:00 the next day. */
  startHour: number;
  endHour: number;
}

export const lines: readonly Line[] = [
  { code: 'L1', name: 'Line 1 · levelling compounds' },
  { code: 'L2', name: 'Line 2 · adhesives and repair mortars' },
];

export const shifts: readonly Shift[] = [
  { code: 'early', name: 'Early shift', startHour: 6, endHour: 14 },
  { code: 'late', name: 'Late shift', startHour: 14, endHour: 22 },
  { code: 'night', name: 'Night shift', startHour: 22, endHour: 6 },
];

export const products: readonly Product[] = [
  { code: 'HVL25', name: 'HV Level 25', family: 'levelling', declaredClass: 'CT-C25-F6', lineCode: 'L1' },
  { code: 'HVLF', name: 'HV Level Fine', family: 'levelling', declaredClass: 'CT-C30-F7', lineCode: 'L1' },
  { code: 'HVFX', name: 'HV Fix Flex', family: 'tile-adhesive', declaredClass: 'C2TE S1', lineCode: 'L2' },
  { code: 'HVR3', name: 'HV Patch R3', family: 'repair', declaredClass: 'R3', lineCode: 'L2' },
];

// ---------------------------------------------------------------------------------------------
// Characteristics
// ---------------------------------------------------------------------------------------------

export type ChartType = 'xbar-r' | 'xbar-s' | 'imr';
/** 'we': the four Western Electric rules; 'extended': the extended set with trend rules. */
export type RuleSet = 'we' | 'extended';

export interface Spec {
  lsl?: number;
  usl?: number;
  target?: number;
}

export interface Characteristic {
  code: string;
  productCode: ProductCode;
  testMethodCode: TestMethodCode;
  /** Age of the specimens at test in days; null for fresh-mortar tests. */
  ageDays: number | null;
  name: string;
  unit: string;
  /** Subgroup size: the individual replicate values of one lot's sample are stored. */
  replicates: number;
  chartType: ChartType;
  ruleSet: RuleSet;
  spec: Spec;
  samplingPlan: string;
}

type Sampling = 'each-lot' | 'first-lot-of-shift' | 'first-lot-of-day';

/** How the generator draws values for a characteristic; invented process figures. */
interface ProcessModel {
  mean: number;
  /** Replicate-to-replicate (repeatability) standard deviation. */
  sigmaWithin: number;
  /** Lot-to-lot standard deviation, kept small so the charts are in control outside planted causes. */
  sigmaLot: number;
  sampling: Sampling;
  /** Test time: minutes after the sample is mixed (fresh) or after casting plus the age (hardened). */
  offsetMinutes: number;
}

interface CharacteristicPlan extends Omit<Characteristic, 'name' | 'unit' | 'chartType' | 'samplingPlan'> {
  label: string;
  model: ProcessModel;
}

const samplingText: Record<Sampling, string> = {
  'each-lot': 'Every lot: one sample taken at the packer',
  'first-lot-of-shift': 'First lot of each shift: one sample taken at the packer',
  'first-lot-of-day': 'First lot of each production day: one sample taken at the packer',
};

const shiftSet = 'first-lot-of-shift';
const daySet = 'first-lot-of-day';

function fresh(
  productCode: ProductCode,
  suffix: string,
  method: TestMethodCode,
  label: string,
  replicates: number,
  ruleSet: RuleSet,
  spec: Spec,
  model: Omit<ProcessModel, 'sampling'> & { sampling?: Sampling },
): CharacteristicPlan {
  return {
    code: `${productCode}-${suffix}`,
    productCode,
    testMethodCode: method,
    ageDays: null,
    label,
    replicates,
    ruleSet,
    spec,
    model: { sampling: 'each-lot', ...model },
  };
}

function hardened(
  productCode: ProductCode,
  method: TestMethodCode,
  ageDays: number,
  label: string,
  replicates: number,
  spec: Spec,
  model: ProcessModel,
): CharacteristicPlan {
  return {
    code: `${productCode}-${method}${ageDays}`,
    productCode,
    testMethodCode: method,
    ageDays,
    label: `${label} · ${ageDays} d`,
    replicates,
    ruleSet: 'we',
    spec,
    model,
  };
}

// Spec limits: strengths at 28 d take the declared class as the lower limit (EN 13813 C/F number,
// EN 12004 C2 ≥ 1.0 MPa and E ≥ 0.5 MPa after 30 min open time, EN 1504-3 R3 ≥ 25 MPa and
// bond ≥ 1.5 MPa, S1 deformation 2.5 to < 5 mm — class thresholds from memory). Fresh-property
// limits and early-age limits are invented plant limits (common practice: target ± a band).
const plans: readonly CharacteristicPlan[] = [
  fresh('HVL25', 'FLOW', 'FLOW', 'flow diameter', 2, 'extended', { lsl: 135, usl: 155, target: 145 }, { mean: 145, sigmaWithin: 2, sigmaLot: 0.5, offsetMinutes: 0 }),
  fresh('HVL25', 'FLOW30', 'FLOW', 'flow diameter after 30 min', 2, 'extended', { lsl: 128, usl: 150, target: 139 }, { mean: 139, sigmaWithin: 2.2, sigmaLot: 0.5, offsetMinutes: 30 }),
  fresh('HVL25', 'AIR', 'AIR', 'air content', 1, 'extended', { usl: 5, target: 3 }, { mean: 3, sigmaWithin: 0.35, sigmaLot: 0, offsetMinutes: 5 }),
  fresh('HVL25', 'DENS', 'DENS', 'fresh density', 1, 'we', { lsl: 1900, usl: 2000, target: 1950 }, { mean: 1950, sigmaWithin: 11, sigmaLot: 0, offsetMinutes: 8 }),
  fresh('HVL25', 'SET', 'SET', 'initial setting time', 1, 'we', { lsl: 150, usl: 240, target: 190 }, { mean: 190, sigmaWithin: 9, sigmaLot: 0, sampling: shiftSet, offsetMinutes: 190 }),
  hardened('HVL25', 'RF', 1, 'flexural strength', 3, { lsl: 2 }, { mean: 3, sigmaWithin: 0.2, sigmaLot: 0.05, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVL25', 'RC', 1, 'compressive strength', 6, { lsl: 8 }, { mean: 11, sigmaWithin: 0.6, sigmaLot: 0.1, sampling: shiftSet, offsetMinutes: 10 }),
  hardened('HVL25', 'RF', 7, 'flexural strength', 3, { lsl: 4.5 }, { mean: 5.6, sigmaWithin: 0.25, sigmaLot: 0.05, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVL25', 'RC', 7, 'compressive strength', 6, { lsl: 18 }, { mean: 22, sigmaWithin: 0.9, sigmaLot: 0.15, sampling: shiftSet, offsetMinutes: 10 }),
  hardened('HVL25', 'RF', 28, 'flexural strength', 3, { lsl: 6 }, { mean: 7.5, sigmaWithin: 0.3, sigmaLot: 0.05, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVL25', 'RC', 28, 'compressive strength', 6, { lsl: 25 }, { mean: 30.5, sigmaWithin: 1.1, sigmaLot: 0.2, sampling: shiftSet, offsetMinutes: 10 }),

  fresh('HVLF', 'FLOW', 'FLOW', 'flow diameter', 2, 'extended', { lsl: 140, usl: 160, target: 150 }, { mean: 150, sigmaWithin: 2, sigmaLot: 0.5, offsetMinutes: 0 }),
  fresh('HVLF', 'FLOW30', 'FLOW', 'flow diameter after 30 min', 2, 'extended', { lsl: 133, usl: 155, target: 144 }, { mean: 144, sigmaWithin: 2.2, sigmaLot: 0.5, offsetMinutes: 30 }),
  fresh('HVLF', 'AIR', 'AIR', 'air content', 1, 'extended', { usl: 4.3, target: 2.5 }, { mean: 2.5, sigmaWithin: 0.34, sigmaLot: 0, offsetMinutes: 5 }),
  fresh('HVLF', 'DENS', 'DENS', 'fresh density', 1, 'we', { lsl: 1800, usl: 1900, target: 1850 }, { mean: 1850, sigmaWithin: 10, sigmaLot: 0, offsetMinutes: 8 }),
  fresh('HVLF', 'SET', 'SET', 'initial setting time', 1, 'we', { lsl: 130, usl: 220, target: 170 }, { mean: 170, sigmaWithin: 9, sigmaLot: 0, sampling: shiftSet, offsetMinutes: 170 }),
  hardened('HVLF', 'RF', 1, 'flexural strength', 3, { lsl: 2.5 }, { mean: 3.5, sigmaWithin: 0.2, sigmaLot: 0.05, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVLF', 'RC', 1, 'compressive strength', 6, { lsl: 10 }, { mean: 13, sigmaWithin: 0.7, sigmaLot: 0.1, sampling: shiftSet, offsetMinutes: 10 }),
  hardened('HVLF', 'RF', 7, 'flexural strength', 3, { lsl: 5.2 }, { mean: 6.5, sigmaWithin: 0.3, sigmaLot: 0.05, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVLF', 'RC', 7, 'compressive strength', 6, { lsl: 21.5 }, { mean: 26, sigmaWithin: 1, sigmaLot: 0.15, sampling: shiftSet, offsetMinutes: 10 }),
  hardened('HVLF', 'RF', 28, 'flexural strength', 3, { lsl: 7 }, { mean: 8.8, sigmaWithin: 0.35, sigmaLot: 0.05, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVLF', 'RC', 28, 'compressive strength', 6, { lsl: 30 }, { mean: 36, sigmaWithin: 1.3, sigmaLot: 0.2, sampling: shiftSet, offsetMinutes: 10 }),

  fresh('HVFX', 'DENS', 'DENS', 'fresh density', 1, 'we', { lsl: 1430, usl: 1530, target: 1480 }, { mean: 1480, sigmaWithin: 11, sigmaLot: 0, offsetMinutes: 8 }),
  fresh('HVFX', 'AIR', 'AIR', 'air content', 1, 'we', { lsl: 8, usl: 16, target: 12 }, { mean: 12, sigmaWithin: 0.95, sigmaLot: 0, offsetMinutes: 5 }),
  fresh('HVFX', 'SLIP', 'SLIP', 'slip', 1, 'we', { usl: 0.5, target: 0.2 }, { mean: 0.2, sigmaWithin: 0.06, sigmaLot: 0, offsetMinutes: 25 }),
  hardened('HVFX', 'ADH', 28, 'tensile adhesion strength', 10, { lsl: 1 }, { mean: 1.55, sigmaWithin: 0.12, sigmaLot: 0.02, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVFX', 'OTADH', 28, 'tensile adhesion after 30 min open time', 10, { lsl: 0.5 }, { mean: 0.9, sigmaWithin: 0.09, sigmaLot: 0.015, sampling: shiftSet, offsetMinutes: 20 }),
  // Deliberately marginal: a mean of 3.4 mm with σ 0.3 mm against the S1 lower limit of 2.5 mm gives Cpk ≈ 1.0.
  hardened('HVFX', 'DEFORM', 28, 'transverse deformation', 3, { lsl: 2.5, usl: 5 }, { mean: 3.4, sigmaWithin: 0.3, sigmaLot: 0.05, sampling: daySet, offsetMinutes: 40 }),

  fresh('HVR3', 'DENS', 'DENS', 'fresh density', 1, 'we', { lsl: 2030, usl: 2130, target: 2080 }, { mean: 2080, sigmaWithin: 11, sigmaLot: 0, offsetMinutes: 8 }),
  fresh('HVR3', 'AIR', 'AIR', 'air content', 1, 'we', { usl: 6, target: 4 }, { mean: 4, sigmaWithin: 0.4, sigmaLot: 0, offsetMinutes: 5 }),
  hardened('HVR3', 'RF', 1, 'flexural strength', 3, { lsl: 2 }, { mean: 2.9, sigmaWithin: 0.2, sigmaLot: 0.05, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVR3', 'RC', 1, 'compressive strength', 6, { lsl: 8 }, { mean: 12, sigmaWithin: 0.7, sigmaLot: 0.1, sampling: shiftSet, offsetMinutes: 10 }),
  hardened('HVR3', 'RF', 7, 'flexural strength', 3, { lsl: 4 }, { mean: 5.1, sigmaWithin: 0.25, sigmaLot: 0.05, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVR3', 'RC', 7, 'compressive strength', 6, { lsl: 19 }, { mean: 24, sigmaWithin: 1.1, sigmaLot: 0.15, sampling: shiftSet, offsetMinutes: 10 }),
  hardened('HVR3', 'RF', 28, 'flexural strength', 3, { lsl: 5 }, { mean: 6.5, sigmaWithin: 0.3, sigmaLot: 0.05, sampling: shiftSet, offsetMinutes: 0 }),
  hardened('HVR3', 'RC', 28, 'compressive strength', 6, { lsl: 25 }, { mean: 32, sigmaWithin: 1.4, sigmaLot: 0.25, sampling: shiftSet, offsetMinutes: 10 }),
  hardened('HVR3', 'ADH', 28, 'tensile adhesion strength', 3, { lsl: 1.5 }, { mean: 2.1, sigmaWithin: 0.12, sigmaLot: 0.02, sampling: daySet, offsetMinutes: 0 }),
];

const productByCode = new Map(products.map((p) => [p.code, p]));

// The pull-off method has one standard per product family.
const adhesionStandard: Record<ProductFamily, string> = {
  levelling: 'EN 13892-8',
  'tile-adhesive': 'EN 12004-2',
  repair: 'EN 1542',
};

function samplingPlanText(p: CharacteristicPlan): string {
  const standard = p.testMethodCode === 'ADH' ? adhesionStandard[productByCode.get(p.productCode)!.family] : testMethod(p.testMethodCode).standard;
  const what =
    p.ageDays === null
      ? `${p.replicates === 1 ? 'one reading' : `${p.replicates} readings`} on one mix`
      : p.testMethodCode === 'RC'
        ? `a set of three prisms, ${p.replicates} halves crushed at ${p.ageDays} d`
        : p.testMethodCode === 'RF'
          ? `a set of three prisms broken at ${p.ageDays} d`
          : `${p.replicates} test specimens at ${p.ageDays} d`;
  return `${samplingText[p.model.sampling]}; ${what}. Method: ${standard}.`;
}


export const characteristics: readonly Characteristic[] = plans.map((p) => ({
  code: p.code,
  productCode: p.productCode,
  testMethodCode: p.testMethodCode,
  ageDays: p.ageDays,
  name: `${productByCode.get(p.productCode)!.name} · ${p.label}`,
  unit: testMethod(p.testMethodCode).unit,
  replicates: p.replicates,
  chartType: suggestedChartType(p.replicates),
  ruleSet: p.ruleSet,
  spec: p.spec,
  samplingPlan: samplingPlanText(p),
}));

// ---------------------------------------------------------------------------------------------
// Plant clock (Europe/London)
// ---------------------------------------------------------------------------------------------

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const DAY = 24 * HOUR;

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
function plantDayNumber(utcMs: number): number {
  return Math.floor((utcMs + plantOffsetMinutes(utcMs) * MINUTE) / DAY);
}

/** Instant of a plant-clock hour on the plant day `daysBefore` days before the day of `endMs`. */
function plantTime(endMs: number, daysBefore: number, hour: number): number {
  const d = new Date((plantDayNumber(endMs) - daysBefore) * DAY);
  return plantWallToUtc(d.getUTCFullYear(), d.getUTCMonth(), d.getUTCDate(), hour);
}

// ---------------------------------------------------------------------------------------------
// Deterministic randomness
// ---------------------------------------------------------------------------------------------

/** mulberry32: a small 32-bit seeded generator, uniform on [0, 1). */
function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates by the Box–Muller transform. */
function normalSource(uniform: () => number): () => number {
  let spare: number | null = null;
  return () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    const u = 1 - uniform();
    const v = uniform();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
}

/** FNV-1a hash, so a lot's production minute depends on its code only and not on the seed. */
function hash32(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) h = Math.imul(h ^ text.charCodeAt(i), 0x01000193);
  return h >>> 0;
}

// ---------------------------------------------------------------------------------------------
// Production schedule
// ---------------------------------------------------------------------------------------------

interface Lot {
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

function windowStart(endMs: number, months: number): number {
  const d = new Date(endMs);
  d.setUTCMonth(d.getUTCMonth() - months);
  return d.getTime();
}

/** Every lot produced in [start, end), in order of production. Depends on the dates only. */
function productionSchedule(startMs: number, endMs: number): Lot[] {
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

function isSampled(lot: Lot, sampling: Sampling): boolean {
  if (sampling === 'each-lot') return true;
  return sampling === 'first-lot-of-shift' ? lot.firstOfShift : lot.firstOfDay;
}

// ---------------------------------------------------------------------------------------------
// Planted special causes and process events
// ---------------------------------------------------------------------------------------------

export interface ProcessEvent {
  at: string;
  /** null where the event concerns the whole plant or the lab. */
  lineCode: LineCode | null;
  productCode?: ProductCode;
  title: string;
  description: string;
}

export interface PlantedCause {
  id: string;
  kind: 'step-change' | 'drift' | 'low-period' | 'measurement-error' | 'out-of-spec-lot';
  characteristicCodes: string[];
  /** Start of the window (ISO with plant offset). */
  start: string;
  /** End of the window, exclusive; null when the cause lasts to the end of the data. */
  end: string | null;
  /** Whether the window applies to production time or to test time. */
  basis: 'produced' | 'tested';
  /** The lot, for a single out-of-spec lot. */
  lot?: string;
  description: string;
}

/** Days before the end date at which the causes are planted. */
export const plantedCauseTiming = {
  coldSnapStartDaysBefore: 122,
  coldSnapDays: 7,
  defoamerDriftStartDaysBefore: 110,
  defoamerDriftEndDaysBefore: 82,
  sandSourceDaysBefore: 60,
  /** Moved back to the nearest Tuesday–Friday, so each compressive chart catches one set. */
  pressDaysBefore: 25,
} as const;

const sandStepCodes: readonly string[] = ['HVL25-FLOW', 'HVL25-FLOW30'];
const sandStepSigmas = -2.5;
const defoamerDriftCodes: readonly string[] = ['HVL25-AIR'];
const defoamerDriftAirPercent = 1.7;
const coldSnapCodes: readonly string[] = ['HVL25-RC1', 'HVL25-RF1', 'HVLF-RC1', 'HVLF-RF1'];
const coldSnapFactor: Partial<Record<TestMethodCode, number>> = { RC: 0.75, RF: 0.8 };
const pressFactor = 1.18;

interface OutOfSpecPlant {
  id: string;
  characteristic: string;
  daysBefore: number;
  add?: number;
  factor?: number;
  note?: string;
  description: string;
}

// Each shift puts the lot's expected result at least four standard errors beyond its limit, so the
// day's noise (which moves with the end date) never pulls a planted lot back inside.
const outOfSpecPlants: readonly OutOfSpecPlant[] = [
  { id: 'oos-hvlf-flow', characteristic: 'HVLF-FLOW', daysBefore: 150, add: -18, note: 'Mix looked stiff; second reading from a fresh mix', description: 'One lot of HV Level Fine with flow below the lower limit on both readings.' },
  { id: 'oos-hvl25-rc28', characteristic: 'HVL25-RC28', daysBefore: 100, factor: 0.74, description: 'One lot of HV Level 25 below the declared C25 at 28 days.' },
  { id: 'oos-hvfx-slip', characteristic: 'HVFX-SLIP', daysBefore: 75, add: 0.55, description: 'One lot of HV Fix Flex with slip above 0.5 mm.' },
  { id: 'oos-hvfx-adh28', characteristic: 'HVFX-ADH28', daysBefore: 70, factor: 0.55, description: 'One lot of HV Fix Flex with tensile adhesion below 1.0 MPa at 28 days.' },
  { id: 'oos-hvr3-dens', characteristic: 'HVR3-DENS', daysBefore: 45, add: -100, description: 'One lot of HV Patch R3 with fresh density below the lower limit.' },
  { id: 'oos-hvl25-dens', characteristic: 'HVL25-DENS', daysBefore: 20, add: 100, description: 'One lot of HV Level 25 with fresh density above the upper limit.' },
];

const planByCode = new Map(plans.map((p) => [p.code, p]));

interface CauseWindows {
  coldFrom: number;
  coldTo: number;
  driftFrom: number;
  driftTo: number;
  sandFrom: number;
  pressFrom: number;
  pressTo: number;
}

function causeWindows(endMs: number): CauseWindows {
  const t = plantedCauseTiming;
  let pressDay = t.pressDaysBefore;
  const weekdayOf = (daysBefore: number) => new Date((plantDayNumber(endMs) - daysBefore) * DAY).getUTCDay();
  while (weekdayOf(pressDay) < 2 || weekdayOf(pressDay) > 5) pressDay++;
  return {
    coldFrom: plantTime(endMs, t.coldSnapStartDaysBefore, 0),
    coldTo: plantTime(endMs, t.coldSnapStartDaysBefore - t.coldSnapDays, 0),
    driftFrom: plantTime(endMs, t.defoamerDriftStartDaysBefore, 6),
    driftTo: plantTime(endMs, t.defoamerDriftEndDaysBefore, 6),
    sandFrom: plantTime(endMs, t.sandSourceDaysBefore, 6),
    pressFrom: plantTime(endMs, pressDay, 6),
    pressTo: plantTime(endMs, pressDay, 14),
  };
}

/** When a lot's fresh sample is mixed and, for hardened tests, when its specimens are cast. */
function freshTestAt(lot: Lot): number {
  return lot.producedAt + (30 + (hash32(`${lot.code}/mix`) % 31)) * MINUTE;
}

function testedAt(lot: Lot, plan: CharacteristicPlan): number {
  const mixed = freshTestAt(lot);
  if (plan.ageDays === null) return mixed + plan.model.offsetMinutes * MINUTE;
  return mixed + 15 * MINUTE + plan.ageDays * DAY + plan.model.offsetMinutes * MINUTE;
}

/** The out-of-spec lot of each plant: the first sampled lot of the product on or after the day, tested by the end. */
function outOfSpecLots(lots: readonly Lot[], endMs: number): Map<string, { plant: OutOfSpecPlant; lot: Lot }> {
  const found = new Map<string, { plant: OutOfSpecPlant; lot: Lot }>();
  for (const oos of outOfSpecPlants) {
    const plan = planByCode.get(oos.characteristic);
    if (!plan) throw new Error(`Unknown characteristic ${oos.characteristic}`);
    const from = plantTime(endMs, oos.daysBefore, 6);
    const lot = lots.find(
      (l) => l.product === plan.productCode && l.producedAt >= from && isSampled(l, plan.model.sampling) && testedAt(l, plan) <= endMs,
    );
    if (lot) found.set(`${lot.code}/${oos.characteristic}`, { plant: oos, lot });
  }
  return found;
}

export interface ScenarioWindow {
  endDate: Date;
  months?: number;
}

/** The planted special causes inside the window, with absolute dates and the out-of-spec lots resolved. */
export function plantedCausesFor({ endDate, months = 6 }: ScenarioWindow): PlantedCause[] {
  const endMs = endDate.getTime();
  const startMs = windowStart(endMs, months);
  const w = causeWindows(endMs);
  const lots = productionSchedule(startMs, endMs);
  const pressCodes = plans
    .filter((p) => p.testMethodCode === 'RC')
    .filter((p) =>
      lots.some((l) => l.product === p.productCode && isSampled(l, p.model.sampling) && testedAt(l, p) >= w.pressFrom && testedAt(l, p) < w.pressTo),
    )
    .map((p) => p.code);
  const causes: PlantedCause[] = [
    {
      id: 'cold-snap',
      kind: 'low-period',
      characteristicCodes: [...coldSnapCodes],
      start: plantIso(w.coldFrom),
      end: plantIso(w.coldTo),
      basis: 'produced',
      description: 'A week of cold weather: cold sand, powder and mixing water slowed early hydration, so 1-day strengths of both levelling compounds fell by about a quarter. 7- and 28-day strengths were not affected.',
    },
    {
      id: 'defoamer-drift',
      kind: 'drift',
      characteristicCodes: [...defoamerDriftCodes],
      start: plantIso(w.driftFrom),
      end: plantIso(w.driftTo),
      basis: 'produced',
      description: `As an opened defoamer batch aged over four weeks, the air content of HV Level 25 crept up by about ${defoamerDriftAirPercent} percentage points until the new batch was opened.`,
    },
    {
      id: 'sand-source',
      kind: 'step-change',
      characteristicCodes: [...sandStepCodes],
      start: plantIso(w.sandFrom),
      end: null,
      basis: 'produced',
      description: 'After the change to a new sand source, the flow of HV Level 25 dropped by about 2.5 within-lot standard deviations and stayed there.',
    },
    {
      id: 'press-miscalibration',
      kind: 'measurement-error',
      characteristicCodes: pressCodes,
      start: plantIso(w.pressFrom),
      end: plantIso(w.pressTo),
      basis: 'tested',
      description: `The compression load cell read about ${Math.round((pressFactor - 1) * 100)} % high during one early shift: the compressive sets tested then are too high, a measurement error and not the product. The press was recalibrated at the end of the shift.`,
    },
  ];
  const inWindow = causes.filter((c) => {
    const from = Date.parse(c.start);
    return from >= startMs && from < endMs;
  });
  for (const { plant: oos, lot } of outOfSpecLots(lots, endMs).values()) {
    inWindow.push({
      id: oos.id,
      kind: 'out-of-spec-lot',
      characteristicCodes: [oos.characteristic],
      start: plantIso(lot.producedAt),
      end: plantIso(lot.producedAt),
      basis: 'produced',
      lot: lot.code,
      description: oos.description,
    });
  }
  return inWindow;
}

/** The plant's log of process changes inside the window: the planted causes' events and a few unrelated ones. */
export function processEventsFor({ endDate, months = 6 }: ScenarioWindow): ProcessEvent[] {
  const endMs = endDate.getTime();
  const startMs = windowStart(endMs, months);
  const w = causeWindows(endMs);
  const log: Array<[number, Omit<ProcessEvent, 'at'>]> = [
    [plantTime(endMs, 160, 9), { lineCode: null, title: 'Lab balances checked', description: 'Yearly check of the lab balances against reference weights; all within tolerance.' }],
    [plantTime(endMs, 140, 7), { lineCode: 'L2', title: 'Mixer blades replaced', description: 'Worn ploughshare blades of the Line 2 mixer replaced during planned maintenance.' }],
    [w.coldFrom + 6 * HOUR, { lineCode: null, title: 'Cold weather', description: 'A cold spell is forecast for the week; sand bays and powder silos well below 10 °C in the mornings.' }],
    [plantTime(endMs, 95, 10), { lineCode: 'L1', title: 'Cement from second silo', description: 'Line 1 switched to the second cement silo; same cement type and supplier.' }],
    [w.driftTo, { lineCode: 'L1', productCode: 'HVL25', title: 'New defoamer batch', description: 'Defoamer container for HV Level 25 replaced by a new batch.' }],
    [w.sandFrom, { lineCode: 'L1', productCode: 'HVL25', title: 'New sand source', description: 'Quartz sand 0–0.5 mm for HV Level 25 now from a new quarry; grading certificate on file.' }],
    [w.pressTo, { lineCode: null, title: 'Press recalibrated', description: 'Compression load cell of the testing press found reading high and recalibrated.' }],
  ];
  return log
    .filter(([ms]) => ms >= startMs && ms < endMs)
    .sort((a, b) => a[0] - b[0])
    .map(([ms, e]) => ({ at: plantIso(ms), ...e }));
}

// ---------------------------------------------------------------------------------------------
// Result generation
// ---------------------------------------------------------------------------------------------

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

const coldSnapNote = 'Lab at 14 °C when the prisms were cast, curing cabinet slow to reach set point';

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
    const cold = lot.producedAt >= w.coldFrom && lot.producedAt < w.coldTo;
    for (const plan of byProduct.get(lot.product) ?? []) {
      const { mean, sigmaWithin, sigmaLot, sampling } = plan.model;
      if (!isSampled(lot, sampling)) continue;
      const tested = testedAt(lot, plan);
      if (tested > endMs) continue;

      const method = testMethod(plan.testMethodCode);
      let add = 0;
      let factor = 1;
      let note: string | undefined;
      if (sandStepCodes.includes(plan.code) && lot.producedAt >= w.sandFrom) add += sandStepSigmas * sigmaWithin;
      if (defoamerDriftCodes.includes(plan.code) && lot.producedAt >= w.driftFrom && lot.producedAt < w.driftTo) {
        add += (defoamerDriftAirPercent * (lot.producedAt - w.driftFrom)) / (w.driftTo - w.driftFrom);
      }
      if (cold && coldSnapCodes.includes(plan.code)) {
        factor *= coldSnapFactor[plan.testMethodCode] ?? 1;
        note = coldSnapNote;
      }
      if (plan.testMethodCode === 'RC' && tested >= w.pressFrom && tested < w.pressTo) factor *= pressFactor;
      const planted = oos.get(`${lot.code}/${plan.code}`);
      if (planted) {
        add += planted.plant.add ?? 0;
        factor *= planted.plant.factor ?? 1;
        note = planted.plant.note;
      }

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
