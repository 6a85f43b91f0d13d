import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError, errorMessage } from './http';

/**
 * Puts the API's field-level messages (`details: [{ path, message }]`) under the matching form
 * fields, so a server-side rule reads like a client-side one. Returns whether any field got one.
 */
export function showServerFieldErrors<T extends FieldValues>(error: unknown, setError: UseFormSetError<T>, fields: readonly Path<T>[]): boolean {
  if (!(error instanceof ApiError)) return false;
  let shown = false;
  for (const detail of error.details) {
    const field = fields.find((name) => name === detail.path);
    if (field) {
      setError(field, { message: detail.message });
      shown = true;
    }
  }
  return shown;
}

/** Shows a refusal of the server: under the fields its `details` name, otherwise on the form as a whole (`root`). */
export function showServerErrors<T extends FieldValues>(error: unknown, setError: UseFormSetError<T>, fields: readonly Path<T>[]): void {
  if (!showServerFieldErrors(error, setError, fields)) setError('root', { message: errorMessage(error) });
}
