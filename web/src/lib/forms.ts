import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError } from './http';

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
