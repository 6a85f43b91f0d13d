import { z } from 'zod';
import { parsePlantDateTime } from './values';

const dateText = (what: string) =>
  z
    .string({ message: `${what} is required` })
    .trim()
    .min(1, `${what} is required`)
    .refine((s) => parsePlantDateTime(s, 'UTC') !== null, { message: `${what}: use a date and time such as 2026-11-30T06:15` });

/** One characteristic of the lot: its replicate readings as typed. */
export const manualResultSchema = z.object({
  /** Characteristic code, e.g. HVL25-RC28. */
  characteristic: z.string().trim().min(1, 'Choose a characteristic'),
  /** What the readings are: finished results in the characteristic's unit, or raw loads in kN or N. */
  entryUnit: z.enum(['result', 'kN', 'N'], { message: 'Say whether you enter results, or loads in kN or N' }).default('result'),
  /** Pull head for pull-off loads: the area decides the result. */
  pullHead: z.enum(['square50', 'round50']).optional(),
  /** Readings in replicate order. */
  replicates: z
    .array(z.number({ message: 'Enter a number' }).finite('Enter a finite number'), { message: 'Enter the readings' })
    .min(1, 'Enter at least one reading')
    .max(20, 'At most 20 readings per characteristic'),
  /** When the specimens were tested (plant time); defaults to now. */
  testedAt: dateText('Test time').optional(),
  /** Remark kept with every reading. */
  note: z.string().trim().max(500, 'Keep the note under 500 characters').optional(),
});

/** POST /api/v1/measurements: one lot's results typed in by a technician. */
export const manualEntrySchema = z.object({
  /** Lot number as printed on the bag or silo ticket. */
  lot: z
    .string({ message: 'Lot number is required' })
    .trim()
    .regex(/^[A-Za-z0-9][A-Za-z0-9._/-]{0,63}$/, 'Lot number may hold only letters, digits and . _ / - (at most 64)'),
  /** Product code. */
  product: z.string().trim().min(1, 'Choose a product'),
  /** Production line code. */
  line: z.string().trim().min(1, 'Choose a production line'),
  /** When the lot was produced (plant time): results belong to this moment. */
  producedAt: dateText('Production time'),
  /** Shift that produced the lot. */
  shift: z.enum(['early', 'late', 'night'], { message: 'Choose early, late or night shift' }).optional(),
  /** Technician who ran the tests (initials are fine). */
  operator: z.string().trim().max(80, 'Keep the operator under 80 characters').optional(),
  /** The lot's results, one entry per characteristic. */
  results: z.array(manualResultSchema).min(1, 'Enter at least one characteristic'),
});
export type ManualEntryInput = z.input<typeof manualEntrySchema>;
export type ManualEntry = z.output<typeof manualEntrySchema>;

/** POST /api/v1/uploads/:id/void */
export const voidUploadSchema = z.object({
  /** Why the upload's results must leave every calculation; kept in the audit trail. */
  reason: z.string({ message: 'Give a reason' }).trim().min(5, 'Give a reason of at least 5 characters').max(500, 'Keep the reason under 500 characters'),
});

/** PATCH /api/v1/measurements/:id: an explicit correction of one stored value. */
export const correctMeasurementSchema = z.object({
  /** Corrected value in the characteristic's unit. */
  value: z.number({ message: 'Enter the corrected value as a number' }).finite(),
  /** Why the stored value was wrong; kept in the audit trail. */
  reason: z.string({ message: 'Give a reason' }).trim().min(5, 'Give a reason of at least 5 characters').max(500),
});
