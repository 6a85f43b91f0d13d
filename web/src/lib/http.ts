import type { ErrorBody, ErrorDetail } from '@shared/schemas/errors';

/** One problem reported by the API: a field (`{ path: 'email', message: … }`) or a row of a file (with `row` and `column`). */
export type ApiErrorDetail = ErrorDetail;

/**
 * Every failed request ends here, so screens handle one error type. `status` is the HTTP status,
 * or 0 when the server could not be reached at all. The API answers every error as `{ error, details?, uploadId? }`.
 */
export class ApiError extends Error {
  readonly status: number;
  readonly details: ApiErrorDetail[];
  /** The upload a refused file concerns: the stored rejected file (422) or the earlier import of the same bytes (409). */
  readonly uploadId: number | undefined;

  constructor(status: number, message: string, details: ApiErrorDetail[] = [], uploadId?: number) {
    super(message);
    this.name = 'ApiError';
    this.status = status;
    this.details = details;
    this.uploadId = uploadId;
  }
}

export interface RequestOptions {
  method?: 'GET' | 'POST' | 'PATCH' | 'PUT' | 'DELETE';
  /** Sent as JSON; a FormData (a file upload) is sent as multipart as it is. */
  body?: unknown;
  signal?: AbortSignal;
  /**
   * Whether a 401 means "the session has ended" and should send the user back to sign-in.
   * The sign-in and session probes answer 401 as an ordinary result and turn this off.
   */
  endsSessionOn401?: boolean;
}

type UnauthorizedListener = () => void;
let unauthorizedListener: UnauthorizedListener | null = null;

/** The app registers one listener that returns to sign-in; returns the function that removes it. */
export function onUnauthorized(listener: UnauthorizedListener): () => void {
  unauthorizedListener = listener;
  return () => {
    if (unauthorizedListener === listener) unauthorizedListener = null;
  };
}

const UNREACHABLE = 'Cannot reach the Prismline server. Check the network connection and try again.';

/**
 * Fetches JSON from the API on the same origin. The session travels in the httpOnly cookie the
 * server sets at sign-in, so no token is kept in the page.
 */
export async function http<T>(path: string, options: RequestOptions = {}): Promise<T> {
  const { method = 'GET', body, signal, endsSessionOn401 = true } = options;
  const headers: Record<string, string> = { Accept: 'application/json' };
  const multipart = body instanceof FormData;
  // For multipart the browser writes the Content-Type itself, with the boundary.
  if (body !== undefined && !multipart) headers['Content-Type'] = 'application/json';

  let response: Response;
  try {
    response = await fetch(path, {
      method,
      headers,
      body: body === undefined ? undefined : multipart ? body : JSON.stringify(body),
      credentials: 'same-origin',
      signal,
    });
  } catch (cause) {
    if (signal?.aborted) throw cause;
    throw new ApiError(0, UNREACHABLE);
  }

  if (response.ok) {
    if (response.status === 204) return undefined as T;
    const text = await response.text();
    return (text ? JSON.parse(text) : undefined) as T;
  }

  const payload = await readErrorPayload(response);
  const error = new ApiError(
    response.status,
    payload.error ?? `The server answered ${response.status} ${response.statusText}`.trim(),
    payload.details,
    payload.uploadId,
  );
  if (response.status === 401 && endsSessionOn401) unauthorizedListener?.();
  throw error;
}

async function readErrorPayload(response: Response): Promise<Partial<ErrorBody>> {
  try {
    const payload: unknown = await response.json();
    if (payload && typeof payload === 'object') {
      const { error, details, uploadId } = payload as { [K in keyof ErrorBody]?: unknown };
      return {
        error: typeof error === 'string' && error ? error : undefined,
        details: Array.isArray(details) ? details.filter(isDetail) : undefined,
        uploadId: typeof uploadId === 'number' ? uploadId : undefined,
      };
    }
  } catch {
    // A proxy or crash page answered with HTML or nothing; the status line has to do.
  }
  return {};
}

function isDetail(value: unknown): value is ApiErrorDetail {
  if (!value || typeof value !== 'object') return false;
  const d = value as Record<keyof ApiErrorDetail, unknown>;
  return typeof d.path === 'string' && typeof d.message === 'string' && (d.row === undefined || typeof d.row === 'number') && (d.column === undefined || typeof d.column === 'string');
}

/** A message fit for the screen from anything a query or mutation threw. */
export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error) return error.message;
  return 'Something went wrong.';
}
