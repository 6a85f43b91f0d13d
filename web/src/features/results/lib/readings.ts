import { isPhysicallyPossible, resultFromEntry, roundHead50, squareHead50, type PullHead } from '@shared/lab';
import type { ManualEntryInput } from '@shared/ingest';
import type { Characteristic } from '@web/lib/catalogue';

type ManualResult = ManualEntryInput['results'][number];

/** The pull heads the entry form offers, as the API names them. */
export const pullHeads: Record<NonNullable<ManualResult['pullHead']>, { head: PullHead; label: string }> = {
  square50: { head: squareHead50, label: '50 × 50 mm square head' },
  round50: { head: roundHead50, label: 'Ø 50 mm round head' },
};

export type ReadingResult = { kind: 'empty' } | { kind: 'result'; value: number; possible: boolean } | { kind: 'error'; message: string };

/** What one typed reading gives, by the same conversion the server applies before storing. */
export function readingResult(characteristic: Characteristic, entry: Pick<ManualResult, 'entryUnit' | 'pullHead'>, reading: number | undefined): ReadingResult {
  if (reading === undefined || !Number.isFinite(reading)) return { kind: 'empty' };
  try {
    const value = resultFromEntry(characteristic.testMethodCode, {
      value: reading,
      unit: entry.entryUnit ?? 'result',
      pullHead: entry.pullHead ? pullHeads[entry.pullHead].head : undefined,
    });
    return { kind: 'result', value, possible: isPhysicallyPossible(characteristic.testMethodCode, value) };
  } catch (error) {
    return { kind: 'error', message: (error as Error).message };
  }
}

/** The word for one reading of a method: prisms break, halves are crushed, specimens are pulled off. */
export function readingWord(characteristic: Pick<Characteristic, 'testMethodCode'>): string {
  switch (characteristic.testMethodCode) {
    case 'RF':
      return 'Prism';
    case 'RC':
      return 'Half';
    case 'ADH':
    case 'OTADH':
      return 'Specimen';
    default:
      return 'Reading';
  }
}
