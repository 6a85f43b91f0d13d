/** Thrown for input that is a programming error rather than a property of the data. */
export class SpcInputError extends Error {
  override name = 'SpcInputError';
}
