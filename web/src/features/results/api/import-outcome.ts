import { ApiError } from '@web/lib/http';
import type { UploadDuplicate, UploadImported, UploadRejected } from '@shared/schemas/uploads';

/** What the server made of a file: every row stored, none stored, or the same bytes seen before. */
export type UploadOutcome =
  | ({ kind: 'imported' } & UploadImported)
  | ({ kind: 'rejected'; message: string } & Pick<UploadRejected, 'id' | 'errors'>)
  | ({ kind: 'duplicate' } & Pick<UploadDuplicate, 'uploadId'>);

/** The 422 and 409 answers of the import path, shared by uploads and manual entry. */
export function fileOutcome(error: unknown): Exclude<UploadOutcome, { kind: 'imported' }> | null {
  if (!(error instanceof ApiError)) return null;
  const body = error.body as Partial<UploadRejected & UploadDuplicate> | undefined;
  if (error.status === 422 && Array.isArray(body?.errors)) return { kind: 'rejected', id: body.id ?? null, message: error.message, errors: body.errors };
  if (error.status === 409 && typeof body?.uploadId === 'number') return { kind: 'duplicate', uploadId: body.uploadId };
  return null;
}
