import { evaluateCompressiveSet, evaluateFlexuralSet, type SetStatus } from '@shared/lab';
import type { Characteristic } from '@web/lib/catalogue';

export interface SetResult {
  /** The lot's result for the characteristic; null when the set is rejected. */
  value: number | null;
  /** Set only where EN 196-1 has a rule for the set (three flexural prisms, six compressive halves). */
  status: SetStatus | null;
  discardedIndex: number | null;
  reason: string;
}

/**
 * The result of a lot's readings: the EN 196-1 evaluation for a full prism set, otherwise the mean.
 * Values must be finite and ≥ 0 for the prism rules; other methods take the mean as it is.
 */
export function setResult(characteristic: Pick<Characteristic, 'testMethodCode'>, values: readonly number[]): SetResult {
  const strengths = values.every((v) => Number.isFinite(v) && v >= 0);
  if (strengths && characteristic.testMethodCode === 'RC' && values.length === 6) {
    const set = evaluateCompressiveSet(values);
    return { value: set.mean, status: set.status, discardedIndex: set.discardedIndex, reason: set.reason };
  }
  if (strengths && characteristic.testMethodCode === 'RF' && values.length === 3) {
    const set = evaluateFlexuralSet(values);
    return { value: set.mean, status: set.status, discardedIndex: null, reason: set.reason };
  }
  const mean = values.reduce((sum, v) => sum + v, 0) / values.length;
  return { value: mean, status: null, discardedIndex: null, reason: values.length === 1 ? 'A single reading.' : `The mean of ${values.length} readings.` };
}

/** The state of an EN 196-1 prism set in words, with the tone of its badge. */
export const setStatusText = {
  accepted: { tone: 'positive', label: 'Set accepted' },
  'accepted-one-discarded': { tone: 'warning', label: 'Set accepted, one value discarded' },
  rejected: { tone: 'negative', label: 'Set rejected: repeat the test' },
} as const;
