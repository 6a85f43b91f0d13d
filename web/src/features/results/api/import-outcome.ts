import { ApiError } from '@web/lib/http';
import type { RowError } from '@shared/ingest';

/** What the server made of a file: every row stored, none stored, or the same bytes seen before. */
export type UploadOutcome =
  | { kind: 'imported'; id: number; rowsImported: number }
  | { kind: 'rejected'; id: number | null; message: string; errors: RowError[] }
  | { kind: 'duplicate'; uploadId: number };

/** The 422 and 409 answers of the import path, shared by uploads and manual entry. */
export function fileOutcome(error: unknown): Exclude<UploadOutcome, { kind: 'imported' }> | null {
  if (!(error instanceof ApiError)) return null;
  const body = error.body as { errors?: RowError[]; id?: number | null; uploadId?: number } | undefined;
  if (error.status === 422 && Array.isArray(body?.errors)) return { kind: 'rejected', id: body.id ?? null, message: error.message, errors: body.errors };
  if (error.status === 409 && typeof body?.uploadId === 'number') return { kind: 'duplicate', uploadId: body.uploadId };
  return null;
}
