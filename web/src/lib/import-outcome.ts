import { ApiError } from './http';
import type { RowError } from '@shared/ingest';
import type { UploadImported } from '@shared/schemas/uploads';

/** What the server made of a file: every row stored, none stored, or the same bytes seen before. */
export type UploadOutcome =
  | ({ kind: 'imported' } & UploadImported)
  | { kind: 'rejected'; message: string; /** The rejected file kept as evidence; null for a manual entry. */ id: number | null; errors: RowError[] }
  | { kind: 'duplicate'; uploadId: number };

/** The 422 and 409 answers of the import path, shared by uploads and manual entry: the rows to correct are the details that name a row. */
export function fileOutcome(error: unknown): Exclude<UploadOutcome, { kind: 'imported' }> | null {
  if (!(error instanceof ApiError)) return null;
  const errors: RowError[] = error.details.flatMap((d) => (d.row === undefined ? [] : [{ row: d.row, column: d.column ?? '', message: d.message }]));
  if (error.status === 422 && errors.length) return { kind: 'rejected', id: error.uploadId ?? null, message: error.message, errors };
  if (error.status === 409 && error.uploadId !== undefined) return { kind: 'duplicate', uploadId: error.uploadId };
  return null;
}
