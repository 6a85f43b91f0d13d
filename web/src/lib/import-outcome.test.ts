import { describe, expect, it } from 'vitest';
import { ApiError } from './http';
import { fileOutcome } from './import-outcome';

describe('the outcome of a refused file', () => {
  it('takes the rows to correct from the details that name a row, and the stored upload for its error report', () => {
    const error = new ApiError(422, 'Nothing was imported: 2 rows need correcting', [
      { path: 'row 2 › replicate', row: 2, column: 'replicate', message: 'Duplicate: already stored' },
      { path: 'row 1', row: 1, column: '', message: 'Missing columns: line' },
    ], 41);
    expect(fileOutcome(error)).toEqual({
      kind: 'rejected',
      id: 41,
      message: 'Nothing was imported: 2 rows need correcting',
      errors: [
        { row: 2, column: 'replicate', message: 'Duplicate: already stored' },
        { row: 1, column: '', message: 'Missing columns: line' },
      ],
    });
  });

  it('names the earlier upload of the same bytes, and leaves other refusals to the form', () => {
    expect(fileOutcome(new ApiError(409, 'This file was already imported as upload 40', [], 40))).toEqual({ kind: 'duplicate', uploadId: 40 });
    expect(fileOutcome(new ApiError(422, 'No rows', [{ path: 'file', message: 'empty' }]))).toBeNull();
    expect(fileOutcome(new ApiError(409, 'Upload 3 is voided'))).toBeNull();
    expect(fileOutcome(new Error('x'))).toBeNull();
  });
});
