import { z } from 'zod';
import { FUTURE_ALLOWANCE_MINUTES, manualEntrySchema, manualResultSchema } from '@shared/ingest';
import { dateFormatHint, plantIso, readPlantDateTime, type PlantClock } from '@shared/time';

/** How a date and time is typed at the plant, e.g. "dd/mm/yyyy hh:mm". */
export const plantDateTimeHint = (clock: PlantClock) => `${dateFormatHint(clock.dateFormat)} hh:mm`;

/**
 * A date and time typed in the plant's format and read on the plant's clock, sent to the API as ISO 8601
 * with the plant's offset. The same refusals as the server's, said before anything is sent.
 */
function plantDateTime(what: 'Production time' | 'Test time', clock: PlantClock, now: () => number) {
  return z
    .string({ message: `${what} is required` })
    .trim()
    .min(1, `${what} is required`)
    .transform((text, ctx) => {
      const instant = readPlantDateTime(text, clock);
      if (!instant) {
        ctx.addIssue({ code: 'custom', message: `${what}: type the plant's date and time as ${plantDateTimeHint(clock)}` });
        return z.NEVER;
      }
      if (instant.getTime() > now() + FUTURE_ALLOWANCE_MINUTES * 60_000) {
        ctx.addIssue({ code: 'custom', message: `${what} is later than now: results cannot come from the future (up to ${FUTURE_ALLOWANCE_MINUTES} minutes ahead are taken, for clocks that differ)` });
        return z.NEVER;
      }
      return plantIso(instant, clock.timeZone);
    });
}

/** The manual-entry form: the API's schema, with its times typed on the plant's clock and in its date format. */
export function manualEntryFormSchema(clock: PlantClock, now: () => number = Date.now) {
  return manualEntrySchema
    .extend({
      producedAt: plantDateTime('Production time', clock, now),
      results: z.array(manualResultSchema.extend({ testedAt: plantDateTime('Test time', clock, now).optional() })).min(1, 'Enter at least one characteristic'),
    })
    .superRefine((entry, ctx) => {
      const produced = Date.parse(entry.producedAt);
      entry.results.forEach((result, i) => {
        // A minute's grace, as the import allows.
        if (result.testedAt !== undefined && Date.parse(result.testedAt) < produced - 60_000) {
          ctx.addIssue({ code: 'custom', path: ['results', i, 'testedAt'], message: 'Test time is before the lot was produced' });
        }
      });
    });
}
