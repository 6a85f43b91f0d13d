import { describe, expect, it, vi } from 'vitest';
import { ApiError } from './http';
import { showServerErrors, showServerFieldErrors } from './forms';

describe('server errors in a form', () => {
  it('puts each detail under the field it names and nothing on the form', () => {
    const setError = vi.fn();
    const error = new ApiError(400, 'effectiveFrom: a new revision cannot take effect before revision 2', [
      { path: 'effectiveFrom', message: 'A new revision cannot take effect before revision 2' },
      { path: 'notAField', message: 'Ignored' },
    ]);
    showServerErrors(error, setError, ['effectiveFrom', 'reason']);
    expect(setError.mock.calls).toEqual([['effectiveFrom', { message: 'A new revision cannot take effect before revision 2' }]]);
  });

  it('puts the message on the form as a whole when no detail names one of its fields, without reading field names out of it', () => {
    const setError = vi.fn();
    // The message starts like a field name, but only details place errors under fields.
    showServerErrors(new ApiError(409, 'reason: already closed'), setError, ['reason']);
    expect(setError.mock.calls).toEqual([['root', { message: 'reason: already closed' }]]);
    setError.mockClear();
    showServerErrors(new TypeError('Failed to fetch'), setError, ['reason']);
    expect(setError.mock.calls).toEqual([['root', { message: 'Failed to fetch' }]]);
  });

  it('reports whether any field got a message', () => {
    expect(showServerFieldErrors(new ApiError(409, 'taken', [{ path: 'email', message: 'taken' }]), vi.fn(), ['email'])).toBe(true);
    expect(showServerFieldErrors(new ApiError(409, 'taken', [{ path: 'email', message: 'taken' }]), vi.fn(), ['name'])).toBe(false);
  });
});
