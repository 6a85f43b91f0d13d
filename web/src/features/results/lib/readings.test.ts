import { describe, expect, it } from 'vitest';
import type { Characteristic } from '@web/lib/catalogue';
import { readingResult } from './readings';
import { setResult } from './sets';
import { specVerdictBadge } from '@web/lib/spec';

const characteristic = (testMethodCode: Characteristic['testMethodCode'], rawLoad: Characteristic['rawLoad']) => ({ testMethodCode, rawLoad }) as Characteristic;
const rc = characteristic('RC', 'compressive');
const rf = characteristic('RF', 'flexural');
const adh = characteristic('ADH', 'pull-off');

describe('readings typed in the entry form', () => {
  it('converts press loads by the EN 196-1 formulas', () => {
    // EN 196-1: Rc = Fc / 1600 mm²; 40 kN → 25.0 MPa, 48 000 N → 30.0 MPa.
    expect(readingResult(rc, { entryUnit: 'kN' }, 40)).toEqual({ kind: 'result', value: 25, possible: true });
    expect(readingResult(rc, { entryUnit: 'N' }, 48_000)).toEqual({ kind: 'result', value: 30, possible: true });
    // EN 196-1: Rf = 1.5 · Ff · l / b³ = 1.5 · 3200 N · 100 mm / 40³ mm³ = 7.5 MPa.
    expect(readingResult(rf, { entryUnit: 'kN' }, 3.2)).toMatchObject({ kind: 'result', value: 7.5 });
  });

  it('divides a pull-off force by the area of the pull head chosen', () => {
    // Force / area: 2500 N over 50 × 50 mm = 1.00 MPa; over a Ø 50 mm disc (π · 25² = 1963.5 mm²) = 1.273 MPa.
    expect(readingResult(adh, { entryUnit: 'N', pullHead: 'square50' }, 2500)).toMatchObject({ kind: 'result', value: 1 });
    const round = readingResult(adh, { entryUnit: 'kN', pullHead: 'round50' }, 2.5);
    expect(round.kind === 'result' && round.value).toBeCloseTo(2500 / (Math.PI * 25 * 25), 10);
    expect(readingResult(adh, { entryUnit: 'kN' }, 2.5)).toMatchObject({ kind: 'error', message: expect.stringMatching(/needs the pull head/) });
  });

  it('takes a result as typed, flags an impossible one, and leaves an empty reading empty', () => {
    expect(readingResult(rc, { entryUnit: 'result' }, 31.2)).toEqual({ kind: 'result', value: 31.2, possible: true });
    // Strengths must lie below 200 MPa (the method's physical range in shared/lab).
    expect(readingResult(rc, { entryUnit: 'kN' }, 400)).toEqual({ kind: 'result', value: 250, possible: false });
    expect(readingResult(rc, { entryUnit: 'kN' }, -1)).toMatchObject({ kind: 'error' });
    expect(readingResult(rc, { entryUnit: 'kN' }, undefined)).toEqual({ kind: 'empty' });
    expect(readingResult(rc, { entryUnit: 'kN' }, Number.NaN)).toEqual({ kind: 'empty' });
  });
});

describe('the result of a set and its verdict', () => {
  it('applies the EN 196-1 six-halves rule to a compressive set and the mean elsewhere', () => {
    // EN 196-1: five halves of 30.0 and one of 36.0 MPa average 31.0; 36.0 lies 16 % from it (> 10 %) and is discarded; the other five average 30.0.
    expect(setResult(rc, [30, 30, 30, 30, 30, 36])).toMatchObject({ value: 30, status: 'accepted-one-discarded', discardedIndex: 5 });
    expect(setResult(characteristic('FLOW', null), [145, 147])).toMatchObject({ value: 146, status: null });
  });

  it('compares unrounded values with the limits in force', () => {
    const spec = { revision: 1, lsl: 25, usl: null, target: null, effectiveFrom: '2026-01-01' };
    expect(specVerdictBadge(25, spec, 'MPa', 1)).toEqual({ tone: 'positive', label: 'Within specification' });
    // 24.96 shows as 25.0 with one decimal but is below the LSL of 25.
    expect(specVerdictBadge(24.96, spec, 'MPa', 1)).toEqual({ tone: 'negative', label: 'Below LSL 25.0 MPa' });
    expect(specVerdictBadge(156, { ...spec, lsl: 135, usl: 155 }, 'mm', 0)).toEqual({ tone: 'negative', label: 'Above USL 155 mm' });
    expect(specVerdictBadge(1, null, 'mm', 0)).toEqual({ tone: 'neutral', label: 'No specification in force' });
  });
});
