// The special causes planted in the demo history, each with the process event the plant logged:
// a cold snap, a defoamer drift, a new sand source, a miscalibrated press and single out-of-spec lots.
// The SPC run should find each of them, and the quality manager's decisions (decisions.ts) answer them.
import type { TestMethodCode } from '@shared/lab';
import { type CharacteristicPlan, type LineCode, type ProductCode, plans } from './plant';
import { DAY, HOUR, type Lot, isSampled, plantDayNumber, plantIso, plantTime, productionSchedule, testedAt, windowStart } from './calendar';

export interface ProcessEvent {
  at: string;
  /** null where the event concerns the whole plant or the lab. */
  lineCode: LineCode | null;
  productCode?: ProductCode;
  title: string;
  description: string;
  /** Who wrote it in the log, when it happened: the lab technician on shift, or the quality manager for changes to the process. */
  recordedBy: 'technician' | 'quality_manager';
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

export interface CauseWindows {
  coldFrom: number;
  coldTo: number;
  driftFrom: number;
  driftTo: number;
  sandFrom: number;
  pressFrom: number;
  pressTo: number;
}

export function causeWindows(endMs: number): CauseWindows {
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

/** The out-of-spec lot of each plant: the first sampled lot of the product on or after the day, tested by the end. */
export function outOfSpecLots(lots: readonly Lot[], endMs: number): Map<string, { plant: OutOfSpecPlant; lot: Lot }> {
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
    [plantTime(endMs, 160, 9), { lineCode: null, recordedBy: 'technician', title: 'Lab balances checked', description: 'Yearly check of the lab balances against reference weights; all within tolerance.' }],
    [plantTime(endMs, 140, 7), { lineCode: 'L2', recordedBy: 'quality_manager', title: 'Mixer blades replaced', description: 'Worn ploughshare blades of the Line 2 mixer replaced during planned maintenance.' }],
    [w.coldFrom + 6 * HOUR, { lineCode: null, recordedBy: 'technician', title: 'Cold weather', description: 'A cold spell is forecast for the week; sand bays and powder silos well below 10 °C in the mornings.' }],
    [plantTime(endMs, 95, 10), { lineCode: 'L1', recordedBy: 'quality_manager', title: 'Cement from second silo', description: 'Line 1 switched to the second cement silo; same cement type and supplier.' }],
    [w.driftTo, { lineCode: 'L1', productCode: 'HVL25', recordedBy: 'technician', title: 'New defoamer batch', description: 'Defoamer container for HV Level 25 replaced by a new batch.' }],
    [w.sandFrom, { lineCode: 'L1', productCode: 'HVL25', recordedBy: 'quality_manager', title: 'New sand source', description: 'Quartz sand 0–0.5 mm for HV Level 25 now from a new quarry; grading certificate on file.' }],
    [w.pressTo, { lineCode: null, recordedBy: 'technician', title: 'Press recalibrated', description: 'Compression load cell of the testing press found reading high and recalibrated.' }],
  ];
  return log
    .filter(([ms]) => ms >= startMs && ms < endMs)
    .sort((a, b) => a[0] - b[0])
    .map(([ms, e]) => ({ at: plantIso(ms), ...e }));
}

const coldSnapNote = 'Lab at 14 °C when the prisms were cast, curing cabinet slow to reach set point';

/** What the planted causes do to one lot's results of one characteristic tested at `tested`: an offset, a factor, a lab note. */
export function plantedEffect(
  lot: Lot,
  plan: CharacteristicPlan,
  tested: number,
  w: CauseWindows,
  oos: ReturnType<typeof outOfSpecLots>,
): { add: number; factor: number; note: string | undefined } {
  const { sigmaWithin } = plan.model;
  const cold = lot.producedAt >= w.coldFrom && lot.producedAt < w.coldTo;
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
  return { add, factor, note };
}
