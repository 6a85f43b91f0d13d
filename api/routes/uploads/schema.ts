import { z } from 'zod';
import { columnMappingSchema } from '@shared/ingest';

/** POST /api/v1/uploads and /api/v1/uploads/check: multipart fields besides `file`. */
export const uploadFieldsSchema = z.object({
  /** Optional JSON of a column mapping (wide files, other headers); the canonical long layout without it. */
  mapping: z
    .string()
    .optional()
    .transform((text, ctx) => {
      if (!text) return undefined;
      try {
        return JSON.parse(text) as unknown;
      } catch {
        ctx.addIssue({ code: 'custom', message: 'mapping must be JSON' });
        return z.NEVER;
      }
    })
    .pipe(columnMappingSchema.optional()),
  /** The delimiter the preview read the file with; detected from the file when absent. */
  delimiter: z.enum([';', ',', '\t'], { message: 'delimiter must be ";", "," or a tab' }).optional(),
  /** "true" when the file writes decimals with a comma; detected from the file when absent. */
  decimalComma: z
    .enum(['true', 'false'], { message: 'decimalComma must be "true" or "false"' })
    .transform((text) => text === 'true')
    .optional(),
});
export type UploadFields = z.infer<typeof uploadFieldsSchema>;

/** POST /api/v1/uploads/:id/void body. */
export { voidUploadSchema } from '@shared/ingest';

/** :id of /api/v1/uploads/:id. */
export const uploadIdParamsSchema = z.object({
  /** Numeric upload id. */
  id: z.coerce.number({ message: 'Upload id must be a number' }).int().positive('Upload id must be positive'),
});

/** GET /api/v1/uploads query. */
export const listUploadsQuerySchema = z.object({
  /** Only uploads in this state. */
  status: z.enum(['imported', 'rejected', 'voided']).optional(),
  /** At most this many, newest first. */
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
