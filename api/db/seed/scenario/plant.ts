// The invented plant: Harrow Vale Mortar Works, its lines, shifts and products, and the characteristics
// the lab tests with their specification and the process model the generator draws values from.
// Every number here is invented for the demo; spec limits follow the declared classes and common
// practice, not any real product.
import { type TestMethodCode, testMethod } from '@shared/lab';
import { suggestedChartType } from '@shared/schemas/catalogue';

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

export type Sampling = 'each-lot' | 'first-lot-of-shift' | 'first-lot-of-day';

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

export interface CharacteristicPlan extends Omit<Characteristic, 'name' | 'unit' | 'chartType' | 'samplingPlan'> {
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
export const plans: readonly CharacteristicPlan[] = [
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
