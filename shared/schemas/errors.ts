// The one shape of every error answer of the API, read by the web's http client.

/** One problem with one part of the request. */
export interface ErrorDetail {
  /** Where: a field of the request (`email`, `results.0.replicates.1`), or a row and column of a file (`row 12 › value`). */
  path: string;
  /** What is wrong there, in words for the user. */
  message: string;
  /** For a problem in a file: the file's line number, as the user counts them. */
  row?: number;
  /** For a problem in a file: the column's name in the file ('' when the whole row is concerned). */
  column?: string;
}

/** Every 4xx and 5xx answer: `{ error, details? }`, plus the upload a refusal of a file concerns. */
export interface ErrorBody {
  /** A plain sentence for the user. */
  error: string;
  /** The problems field by field or row by row, when there are such. */
  details?: ErrorDetail[];
  /** The upload the refusal concerns: the stored rejected file (422) or the earlier import of the same bytes (409). */
  uploadId?: number;
}

/** A problem in a row of a file, as a detail: `row 12 › value`. */
export const rowErrorDetail = (e: { row: number; column: string; message: string }): ErrorDetail => ({
  path: e.column ? `row ${e.row} › ${e.column}` : `row ${e.row}`,
  message: e.message,
  row: e.row,
  column: e.column,
});
