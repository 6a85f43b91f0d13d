import { z } from 'zod';
import { PLANT_DATE_FORMATS } from '../time';
import { capabilityThreshold } from './catalogue';

/** PATCH /api/v1/plants/:id: the plant's settings an administrator may change. The time zone is not one: every stored local time was read in it. */
export const updatePlantSchema = z
  .object({
    /** How people type and read dates at the plant (date-fns tokens). */
    dateFormat: z.enum(PLANT_DATE_FORMATS, { message: `Choose one of the date formats: ${PLANT_DATE_FORMATS.join(', ')}` }).optional(),
    /** The capability index below which the nightly run raises a falling-capability alarm (characteristics may set their own). */
    capabilityThreshold: capabilityThreshold.optional(),
  })
  .strict()
  .refine((v) => v.dateFormat !== undefined || v.capabilityThreshold !== undefined, { message: 'Nothing to change: send dateFormat or capabilityThreshold' });
export type UpdatePlantInput = z.infer<typeof updatePlantSchema>;
