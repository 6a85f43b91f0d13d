import { z } from 'zod';
import { createNcrActionSchema, createNcrSchema } from '@shared/schemas/ncr-requests';
import { blankAsUndefined, typedNumber } from '@web/lib/form-values';
import { plantDateText } from '@web/lib/plant-dates';
import type { PlantClock } from '@shared/time';
import { plantDayOf } from '@web/lib/plant-days';

// The NCR forms keep what was typed (a quantity with a decimal comma, a day in the plant's format) and turn it
// into the request body before the shared request schema checks it, so the API's rules and messages land
// under the same fields the server names in its `details`.

const typed = z.string();

export const raiseFormSchema = z
  .object({
    title: typed,
    description: typed,
    severity: typed,
    productId: typed,
    lots: z.array(z.object({ lotNumber: typed, quantityT: typed })),
    holdLots: z.boolean(),
    assigneeId: typed,
  })
  .transform((form): z.input<typeof createNcrSchema> => {
    const lots = form.lots.filter((l) => l.lotNumber.trim() !== '').map((l) => ({ lotNumber: l.lotNumber, quantityT: typedNumber(l.quantityT) }));
    return {
      title: form.title,
      description: form.description,
      severity: form.severity as z.input<typeof createNcrSchema>['severity'],
      productId: blankAsUndefined(form.productId) as string | undefined,
      lots,
      holdLots: lots.length > 0 ? form.holdLots : undefined,
      assigneeId: blankAsUndefined(form.assigneeId) as string | undefined,
    };
  })
  .pipe(createNcrSchema);
export type RaiseForm = z.input<typeof raiseFormSchema>;

export const actionFormSchema = (clock: PlantClock) =>
  z
    .object({ kind: typed, description: typed, ownerId: typed, dueDate: plantDateText('date', clock, 'Give the due date') })
    .transform((form): z.input<typeof createNcrActionSchema> => ({
      kind: form.kind as z.input<typeof createNcrActionSchema>['kind'],
      description: form.description,
      ownerId: blankAsUndefined(form.ownerId) as string,
      dueDate: form.dueDate ? plantDayOf(form.dueDate) : '',
    }))
    .pipe(createNcrActionSchema);
export type ActionForm = z.input<ReturnType<typeof actionFormSchema>>;
