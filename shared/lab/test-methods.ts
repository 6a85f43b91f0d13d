import { type PullHead, pullOffStrength } from './adhesion';
import { type CautionCode, cautionTexts } from './cautions';
import { compressiveStrength, flexuralStrength } from './strength';
import type { ForceUnit } from './units';

export const testMethodCodes = ['FLOW', 'FLOWTIME', 'AIR', 'DENS', 'SET', 'SLIP', 'RF', 'RC', 'ADH', 'OTADH', 'DEFORM'] as const;
export type TestMethodCode = (typeof testMethodCodes)[number];

/** How a raw machine reading becomes a result, for the methods where technicians may enter loads. */
export type RawLoadFormula = 'flexural' | 'compressive' | 'pull-off';

export interface PhysicalRange {
  min: number;
  max: number;
  /** true where the upper bound itself is impossible (strengths: < 200 MPa). */
  maxExclusive: boolean;
}

export interface TestMethod {
  code: TestMethodCode;
  name: string;
  /** Published method the lab follows, or "common practice" where there is none. */
  standard: string;
  /** Fresh mortar (minutes after mixing) or hardened specimens (days after casting). */
  state: 'fresh' | 'hardened';
  unit: string;
  /** Values outside this range cannot be a measurement and are refused at entry. */
  physicalRange: PhysicalRange;
  /** Decimals for display and entry. */
  decimals: number;
  /** Non-null where a raw load in kN or N may be entered instead of the result in MPa. */
  rawLoad: RawLoadFormula | null;
  cautions: readonly CautionCode[];
}

const strengthRange: PhysicalRange = { min: 0, max: 200, maxExclusive: true };
const adhesionRange: PhysicalRange = { min: 0, max: 10, maxExclusive: false };
const freshCautions: readonly CautionCode[] = ['alkaline', 'dust', 'lifting'];

export const testMethods: readonly TestMethod[] = [
  {
    code: 'FLOW',
    name: 'Flow diameter (ring spread on glass)',
    standard: 'EN 12706',
    state: 'fresh',
    unit: 'mm',
    physicalRange: { min: 0, max: 500, maxExclusive: false },
    decimals: 0,
    rawLoad: null,
    cautions: freshCautions,
  },
  {
    code: 'FLOWTIME',
    name: 'Flow time (flow cup with nozzle)',
    standard: 'common practice (no EN method)',
    state: 'fresh',
    unit: 's',
    physicalRange: { min: 0, max: 600, maxExclusive: false },
    decimals: 1,
    rawLoad: null,
    cautions: freshCautions,
  },
  {
    code: 'AIR',
    name: 'Air content of fresh mortar (pressure method)',
    standard: 'EN 1015-7',
    state: 'fresh',
    unit: '%',
    physicalRange: { min: 0, max: 100, maxExclusive: false },
    decimals: 1,
    rawLoad: null,
    cautions: freshCautions,
  },
  {
    code: 'DENS',
    name: 'Fresh bulk density',
    standard: 'EN 1015-6',
    state: 'fresh',
    unit: 'kg/m³',
    physicalRange: { min: 500, max: 3000, maxExclusive: false },
    decimals: 0,
    rawLoad: null,
    cautions: freshCautions,
  },
  {
    code: 'SET',
    name: 'Initial setting time (Vicat needle)',
    standard: 'EN 196-3 apparatus, applied to mortar (common practice)',
    state: 'fresh',
    unit: 'min',
    physicalRange: { min: 0, max: 1440, maxExclusive: false },
    decimals: 0,
    rawLoad: null,
    cautions: freshCautions,
  },
  {
    code: 'SLIP',
    name: 'Slip of a tile on a vertical surface',
    standard: 'EN 12004-2',
    state: 'fresh',
    unit: 'mm',
    physicalRange: { min: 0, max: 50, maxExclusive: false },
    decimals: 2,
    rawLoad: null,
    cautions: freshCautions,
  },
  {
    code: 'RF',
    name: 'Flexural strength (40 × 40 × 160 mm prisms)',
    standard: 'EN 13892-2 (method of EN 196-1)',
    state: 'hardened',
    unit: 'MPa',
    physicalRange: strengthRange,
    decimals: 1,
    rawLoad: 'flexural',
    cautions: ['press', 'dust', 'alkaline'],
  },
  {
    code: 'RC',
    name: 'Compressive strength (prism halves, 40 × 40 mm platens)',
    standard: 'EN 13892-2 (method of EN 196-1)',
    state: 'hardened',
    unit: 'MPa',
    physicalRange: strengthRange,
    decimals: 1,
    rawLoad: 'compressive',
    cautions: ['press', 'dust', 'alkaline'],
  },
  {
    code: 'ADH',
    name: 'Tensile adhesion strength (pull-off)',
    standard: 'EN 13892-8 (screeds); EN 12004-2 (tile adhesives); EN 1542 (repair mortars)',
    state: 'hardened',
    unit: 'MPa',
    physicalRange: adhesionRange,
    decimals: 2,
    rawLoad: 'pull-off',
    cautions: ['resin', 'dust', 'alkaline', 'lifting'],
  },
  {
    code: 'OTADH',
    name: 'Tensile adhesion strength after open time',
    standard: 'EN 12004-2',
    state: 'hardened',
    unit: 'MPa',
    physicalRange: adhesionRange,
    decimals: 2,
    rawLoad: 'pull-off',
    cautions: ['resin', 'dust', 'alkaline'],
  },
  {
    code: 'DEFORM',
    name: 'Transverse deformation',
    standard: 'EN 12002',
    state: 'hardened',
    unit: 'mm',
    physicalRange: { min: 0, max: 50, maxExclusive: false },
    decimals: 1,
    rawLoad: null,
    cautions: ['alkaline', 'dust'],
  },
];

const byCode = new Map(testMethods.map((m) => [m.code, m]));

export function isTestMethodCode(code: string): code is TestMethodCode {
  return byCode.has(code as TestMethodCode);
}

export function testMethod(code: TestMethodCode): TestMethod {
  const m = byCode.get(code);
  if (!m) throw new RangeError(`Unknown test method ${code}`);
  return m;
}

/** Whether a value can be a measurement by this method at all (not whether it is in specification). */
export function isPhysicallyPossible(code: TestMethodCode, value: number): boolean {
  const { min, max, maxExclusive } = testMethod(code).physicalRange;
  return Number.isFinite(value) && value >= min && (maxExclusive ? value < max : value <= max);
}

/** The cautions to show beside a method, ending with the deferral to the data sheet, standard and local rules. */
export function methodCautions(code: TestMethodCode): string[] {
  return cautionTexts(testMethod(code).cautions);
}

/** What a technician typed: a finished result in the method's unit, or a raw load for rawLoad methods. */
export interface ResultEntry {
  value: number;
  unit: 'result' | ForceUnit;
  /** Pull head used; required for a pull-off load, since the area decides the result. */
  pullHead?: PullHead;
}

/** The result in the method's unit from an entry, converting a raw load where the method allows it. */
export function resultFromEntry(code: TestMethodCode, entry: ResultEntry): number {
  const method = testMethod(code);
  if (entry.unit === 'result') return entry.value;
  const load = { value: entry.value, unit: entry.unit };
  switch (method.rawLoad) {
    case 'flexural':
      return flexuralStrength(load);
    case 'compressive':
      return compressiveStrength(load);
    case 'pull-off':
      if (!entry.pullHead) throw new RangeError('A pull-off load needs the pull head (square or round, and its size)');
      return pullOffStrength(load, entry.pullHead);
    default:
      throw new RangeError(`${method.name} is entered as a result in ${method.unit}, not as a load`);
  }
}
