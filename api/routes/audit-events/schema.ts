import { z } from 'zod';
import { auditFilterSchema } from '@api/audit/filter';

/** Events a page of the list may hold. */
export const AUDIT_PAGE_MAX = 200;

/** GET /api/v1/audit-events: the filter, and where the page starts. */
export const auditListQuerySchema = auditFilterSchema.and(
  z.object({
    /** The nextCursor of the page before: this page holds the events older than that place in the chain. */
    after: z.coerce
      .number({ message: 'The cursor must be a number' })
      .int('The cursor must be a whole number')
      .positive('The cursor must be positive')
      .max(Number.MAX_SAFE_INTEGER, 'No such place in the audit trail')
      .optional(),
    /** Events a page, 1 to 200. */
    limit: z.coerce
      .number({ message: 'The page size must be a number' })
      .int('The page size must be a whole number')
      .min(1, 'Show at least one event')
      .max(AUDIT_PAGE_MAX, `Show at most ${AUDIT_PAGE_MAX} events a page`)
      .default(50),
  }),
);

/** GET /api/v1/audit-events.csv: the same filter as the list; the export holds every event it picks. */
export const auditCsvQuerySchema = auditFilterSchema;
