import { z } from 'zod';

const limit = z.number({ message: 'Enter a number' }).finite('Enter a finite number').nullable().optional();

/** POST /api/v1/characteristics/:id/spec-revisions: a new specification revision. */
export const specRevisionSchema = z
  .object({
    /** Lower specification limit; leave empty for a one-sided upper specification. */
    lsl: limit,
    /** Upper specification limit; leave empty for a one-sided lower specification (usual for strength). */
    usl: limit,
    /** Nominal value the process aims at; optional. */
    target: limit,
    /** From when the revision applies, judged against each lot's production time; now when empty. */
    effectiveFrom: z.iso.datetime({ offset: true, message: 'Use an ISO date and time such as 2026-12-01T06:00:00Z' }).optional(),
    /** Why the specification changes (customer agreement, data sheet revision…); kept in the audit trail. */
    reason: z.string({ message: 'Give a reason' }).trim().min(5, 'Give a reason of at least 5 characters').max(500, 'Keep the reason under 500 characters'),
  })
  .refine((s) => s.lsl != null || s.usl != null, { message: 'Give a lower limit, an upper limit or both', path: ['lsl'] })
  .refine((s) => s.lsl == null || s.usl == null || s.lsl < s.usl, { message: 'The lower limit must be below the upper limit', path: ['usl'] })
  .refine((s) => s.target == null || ((s.lsl == null || s.target >= s.lsl) && (s.usl == null || s.target <= s.usl)), {
    message: 'The target must lie within the limits',
    path: ['target'],
  });
export type SpecRevisionInput = z.infer<typeof specRevisionSchema>;

/** POST /api/v1/process-events: something that happened at the plant and may explain a chart. */
export const processEventSchema = z.object({
  /** When it happened (ISO 8601 with offset). */
  occurredAt: z.iso.datetime({ offset: true, message: 'Use an ISO date and time such as 2026-12-01T06:00:00Z' }),
  /** Short title shown on the charts, e.g. "New sand source". */
  title: z.string({ message: 'Give a title' }).trim().min(3, 'Give a title of at least 3 characters').max(80, 'Keep the title under 80 characters'),
  /** What happened, in a sentence or two. */
  description: z.string().trim().max(1000, 'Keep the description under 1000 characters').optional(),
  /** Production line it concerns; empty for the whole plant or the lab. */
  lineCode: z.string().trim().min(1).optional(),
  /** Product it concerns, if only one. */
  productCode: z.string().trim().min(1).optional(),
});
export type ProcessEventInput = z.infer<typeof processEventSchema>;
