import type { ErrorRequestHandler, RequestHandler } from 'express';
import { ZodError, type ZodType } from 'zod';
import type { ErrorBody, ErrorDetail } from '@shared/schemas/errors';
import { logger } from '../logger';
import { DomainError } from '@api/spc/errors';

export type { ErrorBody, ErrorDetail } from '@shared/schemas/errors';

/** An error whose message is meant for the user; answered as `{ error, details?, uploadId? }`. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly details?: readonly ErrorDetail[],
    /** What the refusal concerns, beyond the message (see ErrorBody). */
    readonly about: Pick<ErrorBody, 'uploadId'> = {},
  ) {
    super(message);
  }

  body(): ErrorBody {
    return { error: this.message, ...(this.details?.length ? { details: [...this.details] } : {}), ...this.about };
  }
}

export const badRequest = (message: string, details?: readonly ErrorDetail[]) => new HttpError(400, message, details);
/** A 400 about one field: the message names it, the detail puts it under the field in a form. */
export const fieldError = (path: string, message: string) => badRequest(`${path}: ${message}`, [{ path, message }]);
export const notFound = (what: string) => new HttpError(404, `${what} not found`);
export const conflict = (message: string, details?: readonly ErrorDetail[]) => new HttpError(409, message, details);

/** A unique index refused the row: PostgreSQL's 23505, as thrown by node-postgres or wrapped by Drizzle. */
export const isUniqueViolation = (err: unknown) => (err as { code?: string })?.code === '23505' || (err as { cause?: { code?: string } })?.cause?.code === '23505';

/** Parses with a shared zod schema; a failure becomes a 400 naming each field. */
export function parseBody<T>(schema: ZodType<T>, input: unknown): T {
  const result = schema.safeParse(input);
  if (!result.success) throw zodToHttp(result.error);
  return result.data;
}

function zodToHttp(error: ZodError): HttpError {
  const details = error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
  const first = details[0];
  const message = first ? (first.path ? `${first.path}: ${first.message}` : first.message) : 'Invalid request';
  return new HttpError(400, message, details);
}

export const notFoundApi: RequestHandler = (req, res) => {
  res.status(404).json(new HttpError(404, `No API endpoint ${req.method} ${req.path}`).body());
};

const outageCodes = new Set(['ECONNREFUSED', 'ECONNRESET', '57P01', '57P03', 'ETIMEDOUT']);

/** The database is down or restarting, as opposed to a fault in a query. */
function isDatabaseOutage(err: unknown): boolean {
  for (let e = err as { code?: string; cause?: unknown; message?: string } | undefined, depth = 0; e && depth < 4; e = e.cause as typeof e, depth++) {
    if (e.code && outageCodes.has(e.code)) return true;
    if (/Connection terminated|timeout exceeded when trying to connect/i.test(e.message ?? '')) return true;
  }
  return false;
}

/** The HTTP status of each kind of refusal of the domain (api/spc/errors.ts), whichever route met it. */
const domainStatus: Record<DomainError['kind'], number> = { 'not-found': 404, conflict: 409, invalid: 400, 'not-possible': 422 };

/** Last handler: the user sees a clear message, never a stack trace or SQL. */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  if (err instanceof ZodError) err = zodToHttp(err);
  if (err instanceof DomainError) err = new HttpError(domainStatus[err.kind], err.message);
  const answer = (e: HttpError) => void res.status(e.status).json(e.body());
  if (err instanceof HttpError) return answer(err);
  const status = typeof err?.status === 'number' && err.status >= 400 && err.status < 500 ? err.status : 500;
  if (status === 413) return answer(new HttpError(413, 'The request is too large'));
  if (status < 500) return answer(new HttpError(status, err.expose && err.message ? err.message : 'The request could not be read'));
  if (isDatabaseOutage(err)) {
    logger.warn({ path: req.path, err: (err as Error).message }, 'database unavailable');
    return answer(new HttpError(503, 'The database is not answering; nothing was changed. Try again in a minute'));
  }
  logger.error({ err, path: req.path }, 'unhandled error');
  answer(new HttpError(500, 'Something went wrong on the server; the error has been logged'));
};
