import { z } from 'zod';
import { lotStatuses } from '@shared/schemas/lots';

// A lot number or product code is printable text: a control character (NUL among them) is refused
// here with a plain message, before PostgreSQL would refuse it with a 500.
const printable = (what: string) =>
  z
    .string()
    .trim()
    .max(64, `Keep the ${what} under 64 characters`)
    .regex(/^[^\p{Cc}]*$/u, `The ${what} may not contain control characters`);

/** GET /api/v1/lots query. */
export const listLotsQuerySchema = z.object({
  /** Product code to narrow to. */
  product: printable('product code').optional(),
  /** Start of a lot number, e.g. "L1-2611", in any case; an exact match comes first. */
  q: printable('lot number').optional(),
  /** At most this many, newest first. */
  limit: z.coerce.number().int().min(1).max(200).default(50),
  /** Lots skipped before this page. */
  offset: z.coerce.number({ message: 'offset must be a number' }).int('offset must be a whole number').min(0, 'offset cannot be negative').max(100_000, 'offset must be at most 100000').default(0),
  /** Only lots of this standing: released, on-hold or rejected. */
  status: z.enum(lotStatuses, { message: `status must be one of ${lotStatuses.join(', ')}` }).optional(),
});

/** :lotNumber of /api/v1/lots/:lotNumber. */
export const lotParamsSchema = z.object({
  /** Lot number as stored. */
  lotNumber: printable('lot number').pipe(z.string().min(1, 'Give a lot number')),
});
