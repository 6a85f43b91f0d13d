import { afterEach, describe, expect, it, vi } from 'vitest';
import { ApiError, http, onUnauthorized } from './http';

// Responses are built with the WHATWG Response class that Node 20 ships, as a browser would receive them.
function answer(status: number, body?: unknown, init: ResponseInit = {}) {
  const text = body === undefined ? null : typeof body === 'string' ? body : JSON.stringify(body);
  vi.stubGlobal('fetch', vi.fn(async () => new Response(text, { status, ...init })));
}

afterEach(() => {
  vi.unstubAllGlobals();
});

describe('http', () => {
  it('sends JSON with the same-origin cookie and returns the parsed body', async () => {
    answer(201, { id: 7 });
    const result = await http<{ id: number }>('/api/v1/users', { method: 'POST', body: { name: 'Shift Tester' } });
    expect(result).toEqual({ id: 7 });
    const [path, init] = vi.mocked(fetch).mock.calls[0];
    expect(path).toBe('/api/v1/users');
    expect(init).toMatchObject({ method: 'POST', credentials: 'same-origin', body: '{"name":"Shift Tester"}' });
    expect((init!.headers as Record<string, string>)['Content-Type']).toBe('application/json');
  });

  it('sends a FormData as multipart, leaving the Content-Type with its boundary to the browser', async () => {
    answer(201, { id: 3, rowsImported: 2 });
    const form = new FormData();
    form.append('file', new Blob(['lot;value\n']), 'shift.csv');
    await http('/api/v1/uploads', { method: 'POST', body: form });
    const [, init] = vi.mocked(fetch).mock.calls[0];
    expect(init!.body).toBe(form);
    expect((init!.headers as Record<string, string>)['Content-Type']).toBeUndefined();
  });

  it('keeps the rows of a refused file (details with row and column) and the upload it concerns', async () => {
    const rejected = { error: 'Nothing was imported: 1 row needs correcting', details: [{ path: 'row 5 › value', row: 5, column: 'value', message: '"heavy" is not a number' }], uploadId: 41 };
    answer(422, rejected);
    await expect(http('/api/v1/uploads', { method: 'POST', body: new FormData() })).rejects.toMatchObject({ status: 422, message: rejected.error, details: rejected.details, uploadId: 41 });
    answer(409, { error: 'This file was already imported as upload 40', uploadId: 40 });
    await expect(http('/api/v1/uploads', { method: 'POST', body: new FormData() })).rejects.toMatchObject({ status: 409, details: [], uploadId: 40 });
    // A detail whose row is not a number is not a row of the file.
    answer(422, { error: 'x', details: [{ path: 'row 5', row: '5', message: 'y' }], uploadId: '41' });
    await expect(http('/api/v1/uploads', { method: 'POST', body: new FormData() })).rejects.toMatchObject({ details: [], uploadId: undefined });
  });

  it('returns undefined for 204 No Content', async () => {
    answer(204);
    expect(await http('/api/v1/auth/logout', { method: 'POST' })).toBeUndefined();
  });

  it("throws ApiError with the status, the server's message and its field details", async () => {
    answer(400, { error: 'Invalid input', details: [{ path: 'email', message: 'Enter a valid e-mail address' }, { bogus: 1 }] });
    const error = await http('/api/v1/users').catch((e: unknown) => e);
    expect(error).toBeInstanceOf(ApiError);
    expect(error).toMatchObject({ status: 400, message: 'Invalid input', details: [{ path: 'email', message: 'Enter a valid e-mail address' }] });
  });

  it('falls back to the status line when the error body is not JSON', async () => {
    answer(502, '<html>Bad gateway</html>', { statusText: 'Bad Gateway' });
    await expect(http('/api/health')).rejects.toMatchObject({ status: 502, message: 'The server answered 502 Bad Gateway' });
  });

  it('reports an unreachable server as status 0', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => Promise.reject(new TypeError('fetch failed'))));
    await expect(http('/api/health')).rejects.toMatchObject({ status: 0, message: expect.stringContaining('Cannot reach') });
  });

  it('tells the app a 401 ended the session, unless the caller expects 401', async () => {
    const ended = vi.fn();
    const stop = onUnauthorized(ended);
    try {
      answer(401, { error: 'Sign in first' });
      await expect(http('/api/v1/users')).rejects.toMatchObject({ status: 401, message: 'Sign in first' });
      expect(ended).toHaveBeenCalledTimes(1);

      answer(401, { error: 'Wrong e-mail or password' });
      await expect(http('/api/v1/auth/login', { method: 'POST', body: {}, endsSessionOn401: false })).rejects.toMatchObject({ status: 401 });
      expect(ended).toHaveBeenCalledTimes(1);

      answer(403, { error: 'Administrators only' });
      await expect(http('/api/v1/users')).rejects.toMatchObject({ status: 403 });
      expect(ended).toHaveBeenCalledTimes(1);
    } finally {
      stop();
    }
  });
});
