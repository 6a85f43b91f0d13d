import type { FieldValues, Path, UseFormSetError } from 'react-hook-form';
import { ApiError, errorMessage } from '@web/lib/http';
import { showServerFieldErrors } from '@web/lib/forms';

/**
 * Puts the server's refusal under the field it concerns. Besides `details`, some rules are checked
 * against stored records and answer only a message that starts with the field's name
 * ("effectiveFrom: a new revision cannot take effect before revision 2 …"). Anything else goes to
 * the form as a whole. Returns nothing; the form shows what was set.
 */
export function showServerErrors<T extends FieldValues>(error: unknown, setError: UseFormSetError<T>, fields: readonly Path<T>[], fallback: (message: string) => void): void {
  if (showServerFieldErrors(error, setError, fields)) return;
  if (error instanceof ApiError && error.status === 400) {
    const match = /^([A-Za-z.]+): (.+)$/s.exec(error.message);
    const field = match && fields.find((name) => name === match[1]);
    if (field && match) {
      setError(field, { message: capitalise(match[2]) });
      return;
    }
  }
  fallback(errorMessage(error));
}

const capitalise = (text: string) => text.charAt(0).toUpperCase() + text.slice(1);
