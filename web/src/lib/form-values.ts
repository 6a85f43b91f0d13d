import { parseNumber } from '@shared/ingest';

/** A typed number, with a decimal comma or point; blank stays blank so the schema says "Enter a number". */
export function typedNumber(text: unknown): number | undefined {
  if (typeof text !== 'string' || text.trim() === '') return undefined;
  return parseNumber(text, true) ?? Number.NaN;
}

/** An optional field left blank is left out, rather than sent as an empty text the schema would refuse. */
export function blankAsUndefined(text: unknown): unknown {
  return typeof text === 'string' && text.trim() === '' ? undefined : text;
}
