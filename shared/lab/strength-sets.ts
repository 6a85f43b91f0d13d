/** Outcome of evaluating one set of prism results. */
export type SetStatus = 'accepted' | 'accepted-one-discarded' | 'rejected';

export interface StrengthSetResult {
  status: SetStatus;
  /** The set result in MPa; null when the set is rejected and must be repeated. */
  mean: number | null;
  /** Position (0-based) of the discarded value, if one was discarded. */
  discardedIndex: number | null;
  /** The values as given, in MPa. */
  values: readonly number[];
  /** Plain-words explanation for the technician and the record. */
  reason: string;
}

/** ±10 % of the mean, the tolerance EN 196-1 applies to the compressive values of a set. */
export const compressiveSetTolerance = 0.1;

// Relative slack so that a value lying exactly on ±10 % is not thrown out by binary rounding
// of the mean (e.g. 33 against a mean of 30 computed from decimals).
const boundarySlack = 1e-9;

function mean(values: readonly number[]): number {
  return values.reduce((sum, v) => sum + v, 0) / values.length;
}

function deviatesBeyond(value: number, reference: number, tolerance: number): boolean {
  return Math.abs(value - reference) > tolerance * reference * (1 + boundarySlack);
}

function checkedStrengths(values: readonly number[], count: number, what: string): void {
  if (values.length !== count) {
    throw new RangeError(`${what} needs exactly ${count} values, got ${values.length}`);
  }
  for (const v of values) {
    if (!Number.isFinite(v) || v < 0) throw new RangeError(`${what}: every value must be a number ≥ 0, got ${v}`);
  }
}

function percent(x: number): string {
  return `${(x * 100).toFixed(1)} %`;
}

/**
 * The six compressive values of a set of three prisms (EN 196-1, applied to screed
 * materials by EN 13892-2): the result is the mean of six. If one value deviates by more than
 * ±10 % from that mean it is discarded and the result is the mean of the other five; if one of
 * those five deviates by more than ±10 % from their own mean the whole set is rejected.
 *
 * When two or more of the six lie outside ±10 % of the first mean the set is rejected too:
 * the standard lets only one value go. That reading is ours (from memory of the text).
 */
export function evaluateCompressiveSet(values: readonly number[]): StrengthSetResult {
  checkedStrengths(values, 6, 'A compressive set');
  const meanOfSix = mean(values);
  const outside = values
    .map((v, i) => ({ i, v }))
    .filter(({ v }) => deviatesBeyond(v, meanOfSix, compressiveSetTolerance));

  if (outside.length === 0) {
    return {
      status: 'accepted',
      mean: meanOfSix,
      discardedIndex: null,
      values,
      reason: 'All six values lie within ±10 % of their mean; the result is the mean of six.',
    };
  }
  if (outside.length > 1) {
    return {
      status: 'rejected',
      mean: null,
      discardedIndex: null,
      values,
      reason: `${outside.length} of the six values lie more than ±10 % from their mean; only one may be discarded, so the set is rejected and must be repeated.`,
    };
  }

  const discarded = outside[0];
  const remaining = values.filter((_, i) => i !== discarded.i);
  const meanOfFive = mean(remaining);
  const firstDeviation = Math.abs(discarded.v - meanOfSix) / meanOfSix;
  const stillOutside = remaining.filter((v) => deviatesBeyond(v, meanOfFive, compressiveSetTolerance));
  if (stillOutside.length > 0) {
    return {
      status: 'rejected',
      mean: null,
      discardedIndex: discarded.i,
      values,
      reason: `Value ${discarded.i + 1} (${discarded.v}) lay ${percent(firstDeviation)} from the mean of six and was discarded, but ${stillOutside.length === 1 ? `${stillOutside[0]} still lies` : `${stillOutside.join(', ')} still lie`} more than ±10 % from the mean of the other five; the set is rejected and must be repeated.`,
    };
  }
  return {
    status: 'accepted-one-discarded',
    mean: meanOfFive,
    discardedIndex: discarded.i,
    values,
    reason: `Value ${discarded.i + 1} (${discarded.v}) lay ${percent(firstDeviation)} from the mean of six and was discarded; the result is the mean of the other five.`,
  };
}

/**
 * The three flexural values of a set of three prisms: the result is their mean (EN 196-1).
 * As far as we recall the text, EN 196-1 sets no discard rule for flexural values, so none is
 * applied here (from memory; verify against the current edition before relying on it).
 */
export function evaluateFlexuralSet(values: readonly number[]): StrengthSetResult {
  checkedStrengths(values, 3, 'A flexural set');
  return {
    status: 'accepted',
    mean: mean(values),
    discardedIndex: null,
    values,
    reason: 'The result is the mean of the three prisms; no value is discarded for flexural strength.',
  };
}
