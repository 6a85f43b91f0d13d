import { compressiveStrength, flexuralStrength, pullHeadAreaMm2, pullOffStrength, roundHead50, squareHead50, standardPrism } from '@shared/lab';
import type { TestMethodEntry } from '@web/lib/test-methods';

export interface RawLoadExplanation {
  reading: string;
  formula: string;
  /** A worked example computed with the same functions the entry form and the server use. */
  example: string;
  /** How the results of one set combine, where the standard says so. */
  set?: string;
}

const mpa = (value: number, decimals: number) => `${value.toFixed(decimals)} MPa`;

/** How a machine reading becomes the result, in words, for the methods where loads may be entered. */
export function rawLoadExplanation(method: Pick<TestMethodEntry, 'rawLoad' | 'decimals'>): RawLoadExplanation | null {
  const { sideMm, spanMm, platenAreaMm2 } = standardPrism;
  switch (method.rawLoad) {
    case 'flexural':
      return {
        reading: 'The breaking load Ff of the prism in three-point bending, in kN or N.',
        formula: `Rf = 1.5 · Ff · l / b³, with the span l = ${spanMm} mm and the prism side b = ${sideMm} mm (EN 196-1).`,
        example: `A breaking load of 3.2 kN gives ${mpa(flexuralStrength({ value: 3.2, unit: 'kN' }), method.decimals)}.`,
        set: 'The result of a set of three prisms is the mean of the three values.',
      };
    case 'compressive':
      return {
        reading: `The breaking load Fc of one prism half between ${sideMm} × ${sideMm} mm platens, in kN or N.`,
        formula: `Rc = Fc / ${platenAreaMm2} mm² (EN 196-1).`,
        example: `A breaking load of 40 kN gives ${mpa(compressiveStrength({ value: 40, unit: 'kN' }), method.decimals)}.`,
        set: 'The result of a set is the mean of its six halves. A value more than ±10 % from that mean is discarded and the other five are averaged; if one of them also lies more than ±10 % from their mean, the set is rejected and repeated (EN 196-1).',
      };
    case 'pull-off':
      return {
        reading: 'The pull-off force at failure, in kN or N, and the pull head that was glued on.',
        formula: `Tensile adhesion strength = force / test area: ${pullHeadAreaMm2(squareHead50)} mm² under the 50 × 50 mm square head, ${pullHeadAreaMm2(roundHead50).toFixed(1)} mm² under the Ø 50 mm round head.`,
        example: `A force of 2.5 kN on the square head gives ${mpa(pullOffStrength({ value: 2.5, unit: 'kN' }, squareHead50), method.decimals)}.`,
      };
    default:
      return null;
  }
}

/** The possible range in words, e.g. "0 to below 200 MPa". */
export function physicalRangeText(method: Pick<TestMethodEntry, 'physicalRange' | 'unit'>): string {
  const { min, max, maxExclusive } = method.physicalRange;
  return `${min} to ${maxExclusive ? 'below ' : ''}${max} ${method.unit}`;
}

export const stateLabels: Record<TestMethodEntry['state'], string> = {
  fresh: 'Fresh mortar, minutes after mixing',
  hardened: 'Hardened specimens, days after casting',
};
