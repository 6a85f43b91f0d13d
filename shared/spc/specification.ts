// The specification a result is judged against, written once for the import, the SPC run, the chart,
// the alarms and the web app.
//
// - A characteristic's specification has revisions; each takes effect at an instant and stays in force
//   until a later one takes effect. A lot is judged by the revision in force when it was produced, not
//   by today's: a limit tightened later does not turn yesterday's conforming lot into a reject.
// - A lot's result is the mean of its live (not voided) replicates, as EN 196-1 reports a strength set
//   by its mean (from memory).
// - A result equal to a limit conforms: the tolerance interval runs between and including its limits
//   (ISO 3534-2, tolerance interval, the vocabulary ISO 22514-2 builds on; from memory — and common
//   practice in plant specifications). Limits are compared unrounded.

/** One revision of a characteristic's specification; `effectiveFrom` as a Date or an ISO 8601 string. */
export interface SpecificationRevision {
  revision: number;
  lsl: number | null;
  usl: number | null;
  target: number | null;
  effectiveFrom: Date | string;
}

/** The limits a result is compared with; either may be absent (one-sided specification). */
export interface SpecificationLimits {
  lsl: number | null;
  usl: number | null;
}

/** A result against a specification: inside it (limits included), below the LSL, above the USL, or no limit in force. */
export type SpecVerdict = 'in' | 'below-lsl' | 'above-usl' | 'no-spec';

const instantOf = (t: Date | string | number): number => (typeof t === 'number' ? t : typeof t === 'string' ? Date.parse(t) : t.getTime());

/**
 * The revision in force at `at`: the latest that had taken effect by then (a revision counts from the
 * very instant it takes effect), the higher revision number when two take effect at the same instant;
 * null before the first. The order of the list does not matter.
 */
export function specAt<T extends Pick<SpecificationRevision, 'revision' | 'effectiveFrom'>>(revisions: readonly T[], at: Date | string | number): T | null {
  const atMs = instantOf(at);
  let found: T | null = null;
  let foundMs = -Infinity;
  for (const r of revisions) {
    const from = instantOf(r.effectiveFrom);
    if (from > atMs) continue;
    if (found === null || from > foundMs || (from === foundMs && r.revision > found.revision)) {
      found = r;
      foundMs = from;
    }
  }
  return found;
}

/** A lot's result: the mean of its live replicates. */
export function lotResult(values: readonly number[]): number {
  let sum = 0;
  for (const v of values) sum += v;
  return sum / values.length;
}

/** Where a result lies against the specification; a result on a limit is in. */
export function specVerdict(result: number, spec: SpecificationLimits | null): SpecVerdict {
  if (!spec || (spec.lsl === null && spec.usl === null)) return 'no-spec';
  if (spec.lsl !== null && result < spec.lsl) return 'below-lsl';
  if (spec.usl !== null && result > spec.usl) return 'above-usl';
  return 'in';
}

/** True for a verdict outside the specification (below the LSL or above the USL). */
export const isOutOfSpec = (verdict: SpecVerdict): verdict is 'below-lsl' | 'above-usl' => verdict === 'below-lsl' || verdict === 'above-usl';

/** The limit a result outside the specification broke, by name and value. */
export function brokenLimit(verdict: 'below-lsl' | 'above-usl', spec: SpecificationLimits): { name: 'LSL' | 'USL'; value: number } {
  return verdict === 'below-lsl' ? { name: 'LSL', value: spec.lsl! } : { name: 'USL', value: spec.usl! };
}

/**
 * Whether one replicate lies beyond the strictest limits of any revision (the highest LSL and the
 * lowest USL). A mean outside the revision in force needs at least one replicate beyond that
 * revision's limit, hence beyond the strictest: lots without such a replicate need no judging when
 * their results are new.
 */
export function beyondStrictestLimits(value: number, strictest: SpecificationLimits | undefined): boolean {
  return strictest !== undefined && ((strictest.lsl !== null && value < strictest.lsl) || (strictest.usl !== null && value > strictest.usl));
}
