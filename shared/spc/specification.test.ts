import fc from 'fast-check';
import { mean } from 'simple-statistics';
import { describe, expect, it } from 'vitest';
import { beyondStrictestLimits, brokenLimit, isOutOfSpec, lotResult, specAt, specVerdict } from './specification';

const revision = (n: number, effectiveFrom: string) => ({ revision: n, effectiveFrom, lsl: null, usl: n, target: null });
const at = (iso: string) => Date.parse(iso);

describe('the specification revision that judges a lot', () => {
  // Revisions follow each other in time; a lot is judged by the one in force when it was made, not today's.
  const revisions = [revision(1, '2026-05-16T06:00:00Z'), revision(2, '2026-09-01T06:00:00Z'), revision(3, '2027-01-01T06:00:00Z')];

  it('takes the latest revision that had taken effect when the lot was made', () => {
    expect(specAt(revisions, at('2026-06-01T08:00:00Z'))?.revision).toBe(1);
    expect(specAt(revisions, at('2026-10-01T08:00:00Z'))?.revision).toBe(2);
  });

  it('counts a revision from the very instant it takes effect', () => {
    expect(specAt(revisions, at('2026-09-01T06:00:00Z'))?.revision).toBe(2);
    expect(specAt(revisions, at('2026-09-01T05:59:59Z'))?.revision).toBe(1);
    // The same with Date objects, as the server reads them from the database.
    const dated = revisions.map((r) => ({ ...r, effectiveFrom: new Date(r.effectiveFrom) }));
    expect(specAt(dated, new Date('2026-09-01T06:00:00Z'))?.revision).toBe(2);
    expect(specAt(dated, new Date('2026-09-01T05:59:59.999Z'))?.revision).toBe(1);
  });

  it('finds none for a lot made before the first revision, and ignores the order of the list', () => {
    expect(specAt(revisions, at('2021-11-02T06:20:00Z'))).toBeNull();
    expect(specAt([...revisions].reverse(), at('2026-10-01T08:00:00Z'))?.revision).toBe(2);
    expect(specAt([], at('2026-10-01T08:00:00Z'))).toBeNull();
  });

  it('prefers the higher revision when two take effect at the same instant', () => {
    const tie = [revision(4, '2026-05-16T06:00:00Z'), revision(5, '2026-05-16T06:00:00Z')];
    expect(specAt(tie, at('2026-06-01T00:00:00Z'))?.revision).toBe(5);
    expect(specAt([...tie].reverse(), at('2026-06-01T00:00:00Z'))?.revision).toBe(5);
  });
});

describe("a lot's result", () => {
  it('is the mean of its replicates, as simple-statistics computes it (EN 196-1 reports a set of prisms by its mean)', () => {
    expect(lotResult([30.1, 30.5, 29.8])).toBeCloseTo(mean([30.1, 30.5, 29.8]), 12);
    expect(lotResult([146])).toBe(146);
    fc.assert(
      fc.property(fc.array(fc.integer({ min: 1000, max: 9000 }).map((v) => v / 100), { minLength: 1, maxLength: 12 }), (values) => {
        expect(lotResult(values)).toBeCloseTo(mean(values), 9);
      }),
    );
  });
});

describe('the verdict against a specification', () => {
  const twoSided = { lsl: 135, usl: 155 };

  it('puts a result exactly on a limit inside (ISO 3534-2: the tolerance interval includes its limits; common practice)', () => {
    expect(specVerdict(135, twoSided)).toBe('in');
    expect(specVerdict(155, twoSided)).toBe('in');
    expect(specVerdict(145, twoSided)).toBe('in');
  });

  it('names the side a result leaves the specification on, compared unrounded', () => {
    expect(specVerdict(134.999, twoSided)).toBe('below-lsl');
    expect(specVerdict(155.001, twoSided)).toBe('above-usl');
    expect(brokenLimit('below-lsl', twoSided)).toEqual({ name: 'LSL', value: 135 });
    expect(brokenLimit('above-usl', twoSided)).toEqual({ name: 'USL', value: 155 });
  });

  it('judges one-sided specifications on their one limit (EN 998-2 gives a minimum strength only)', () => {
    expect(specVerdict(4.9, { lsl: 5, usl: null })).toBe('below-lsl');
    expect(specVerdict(1e6, { lsl: 5, usl: null })).toBe('in');
    expect(specVerdict(-1e6, { lsl: null, usl: 0.6 })).toBe('in');
    expect(specVerdict(0.61, { lsl: null, usl: 0.6 })).toBe('above-usl');
  });

  it('gives no verdict without a limit in force', () => {
    expect(specVerdict(145, null)).toBe('no-spec');
    expect(specVerdict(145, { lsl: null, usl: null })).toBe('no-spec');
    expect(isOutOfSpec('no-spec')).toBe(false);
    expect(isOutOfSpec('in')).toBe(false);
    expect(isOutOfSpec('below-lsl')).toBe(true);
    expect(isOutOfSpec('above-usl')).toBe(true);
  });
});

describe('the import prefilter: a replicate beyond the strictest limits of any revision', () => {
  it('compares with the highest LSL and the lowest USL, limits themselves inside', () => {
    const strictest = { lsl: 140, usl: 150 };
    expect(beyondStrictestLimits(139.9, strictest)).toBe(true);
    expect(beyondStrictestLimits(150.1, strictest)).toBe(true);
    expect(beyondStrictestLimits(140, strictest)).toBe(false);
    expect(beyondStrictestLimits(150, strictest)).toBe(false);
    expect(beyondStrictestLimits(100, undefined)).toBe(false);
    expect(beyondStrictestLimits(100, { lsl: null, usl: null })).toBe(false);
  });

  it('never lets through a lot whose mean is outside the revision in force (the mean lies between its smallest and largest value)', () => {
    const limit = fc.option(fc.integer({ min: 100, max: 200 }), { nil: null });
    const revisions = fc.array(fc.record({ lsl: limit, usl: limit, offsetDays: fc.integer({ min: 0, max: 100 }) }), { minLength: 1, maxLength: 5 });
    const values = fc.array(fc.integer({ min: 80, max: 220 }), { minLength: 1, maxLength: 6 });
    fc.assert(
      fc.property(revisions, values, fc.integer({ min: 0, max: 120 }), (revs, vals, producedDay) => {
        const specs = revs.map((r, i) => ({ revision: i + 1, lsl: r.lsl, usl: r.usl, target: null, effectiveFrom: new Date(Date.UTC(2026, 0, 1 + r.offsetDays)) }));
        const lsls = specs.map((s) => s.lsl).filter((v) => v !== null);
        const usls = specs.map((s) => s.usl).filter((v) => v !== null);
        const strictest = { lsl: lsls.length ? Math.max(...lsls) : null, usl: usls.length ? Math.min(...usls) : null };
        const verdict = specVerdict(lotResult(vals), specAt(specs, new Date(Date.UTC(2026, 0, 1 + producedDay))));
        if (isOutOfSpec(verdict)) expect(vals.some((v) => beyondStrictestLimits(v, strictest))).toBe(true);
      }),
    );
  });
});
