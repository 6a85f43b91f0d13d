import { describe, expect, it } from 'vitest';
import { specInForceAt } from './spec';

const revision = (n: number, effectiveFrom: string) => ({ revision: n, effectiveFrom, lsl: null, usl: n, target: null });
const at = (iso: string) => Date.parse(iso);

describe('the specification revision that judges a lot', () => {
  // Revisions follow each other in time; a lot is judged by the one in force when it was made, not today's.
  const revisions = [revision(1, '2026-05-16T06:00:00Z'), revision(2, '2026-09-01T06:00:00Z'), revision(3, '2027-01-01T06:00:00Z')];

  it('takes the latest revision that had taken effect when the lot was made', () => {
    expect(specInForceAt(revisions, at('2026-06-01T08:00:00Z'))?.revision).toBe(1);
    expect(specInForceAt(revisions, at('2026-10-01T08:00:00Z'))?.revision).toBe(2);
  });

  it('counts a revision from the very instant it takes effect', () => {
    expect(specInForceAt(revisions, at('2026-09-01T06:00:00Z'))?.revision).toBe(2);
    expect(specInForceAt(revisions, at('2026-09-01T05:59:59Z'))?.revision).toBe(1);
  });

  it('finds none for a lot made before the first revision, and ignores the order of the list', () => {
    expect(specInForceAt(revisions, at('2021-11-02T06:20:00Z'))).toBeNull();
    expect(specInForceAt([...revisions].reverse(), at('2026-10-01T08:00:00Z'))?.revision).toBe(2);
  });

  it('prefers the higher revision when two take effect at the same instant', () => {
    const tie = [revision(4, '2026-05-16T06:00:00Z'), revision(5, '2026-05-16T06:00:00Z')];
    expect(specInForceAt(tie, at('2026-06-01T00:00:00Z'))?.revision).toBe(5);
  });
});
