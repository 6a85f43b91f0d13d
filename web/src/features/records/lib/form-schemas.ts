import { z } from 'zod';
import { processEventSchema, specRevisionSchema } from '@shared/schemas/plant-records';
import { typedNumber } from '@web/lib/form-values';
import type { PlantClock } from '@shared/time';
import { plantDateText } from '@web/lib/plant-dates';

// The forms keep what was typed (numbers with a decimal comma or point, dates in the plant's format and
// zone) and turn it into the request body before the shared schema checks it, so its rules and messages
// land on the same field names. A date needs the plant's clock, so each schema is made with it.

const typed = z.string();

/** A limit left blank is no limit: a one-sided specification. */
const limit = (text: string) => (text.trim() === '' ? null : typedNumber(text));
/** An optional text left blank is left out, rather than sent as an empty text the schema would refuse. */
const optional = (text: string) => (text.trim() === '' ? undefined : text);

export const specRevisionFormSchema = (clock: PlantClock) =>
  z
    .object({ lsl: typed, usl: typed, target: typed, effectiveFrom: plantDateText('dateTime', clock), reason: typed })
    .transform((form): z.input<typeof specRevisionSchema> => ({
      lsl: limit(form.lsl),
      usl: limit(form.usl),
      target: limit(form.target),
      effectiveFrom: form.effectiveFrom,
      reason: form.reason,
    }))
    .pipe(specRevisionSchema);

export const processEventFormSchema = (clock: PlantClock) =>
  z
    .object({ occurredAt: plantDateText('dateTime', clock, 'Give the date and time it happened'), title: typed, description: typed, lineCode: typed, productCode: typed })
    .transform((form): z.input<typeof processEventSchema> => ({
      occurredAt: form.occurredAt ?? '',
      title: form.title,
      description: optional(form.description),
      lineCode: optional(form.lineCode),
      productCode: optional(form.productCode),
    }))
    .pipe(processEventSchema);
