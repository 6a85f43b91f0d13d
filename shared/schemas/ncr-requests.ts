// What the NCR endpoints accept: one zod schema per endpoint, read by the API and by the NCR forms.
import { z } from 'zod';
import { causeCategories } from './causes';
import { lineText, noteText, plantDay, recordId } from './fields';
import { lotDispositions, ncrActionKinds, ncrSeverities, ncrStatuses } from './ncrs';

const lotNumber = lineText('the lot number', { max: 64 });
/** Tonnes: a lot is a few tonnes to a few hundred; more than 10,000 t is a typing error. */
const tonnes = z.number({ message: 'Give the quantity in tonnes' }).finite().positive('The quantity must be above 0 t').max(10_000, 'A lot of more than 10,000 t is not believable: check the quantity');

/** One lot an NCR concerns. */
export const ncrLotInput = z.object({
  /** The lot's number as stored. */
  lotNumber,
  /** Tonnes of the lot affected; empty when not known yet. */
  quantityT: tonnes.nullable().optional(),
});

/** POST /api/v1/ncrs: raise an NCR from alarms, from a lot, or directly. */
export const createNcrSchema = z.object({
  /** What is wrong, in a line: "Flow below specification on three lots of SL-25". */
  title: lineText('a title', { min: 5, max: 200 }),
  /** What was found, where and when. */
  description: noteText('a description', { min: 10, max: 5000 }),
  severity: z.enum(ncrSeverities, { message: `Choose a severity: ${ncrSeverities.join(', ')}` }),
  /** The product concerned; taken from the lots or alarms when empty. */
  productId: recordId('Product id').optional(),
  /** The alarms it is raised from. */
  alarmIds: z.array(recordId('Alarm id')).max(100, 'Link at most 100 alarms').optional(),
  /** The lots concerned. */
  lots: z.array(ncrLotInput).max(100, 'List at most 100 lots').optional(),
  /** Containment: put every listed lot on hold now (a lot already on hold stays so). */
  holdLots: z.boolean().optional(),
  /** Who follows it up (quality managers and administrators only may assign). */
  assigneeId: recordId('User id').nullable().optional(),
});
export type CreateNcrInput = z.infer<typeof createNcrSchema>;

/** One lot's disposition. */
export const ncrDispositionInput = z.object({
  lotNumber,
  disposition: z.enum(lotDispositions, { message: `Choose a disposition: ${lotDispositions.join(', ')}` }),
  /** Downgrade: the product the lot is sold as instead. */
  downgradeProductId: recordId('Product id').optional(),
  /** Why this decision. */
  note: noteText('a note on the decision', { min: 5, max: 2000 }),
});

/** PATCH /api/v1/ncrs/:id: change fields; only what is given changes. */
export const updateNcrSchema = z
  .object({
    title: lineText('a title', { min: 5, max: 200 }).optional(),
    description: noteText('a description', { min: 10, max: 5000 }).optional(),
    severity: z.enum(ncrSeverities, { message: `Choose a severity: ${ncrSeverities.join(', ')}` }).optional(),
    productId: recordId('Product id').nullable().optional(),
    /** null: nobody. */
    assigneeId: recordId('User id').nullable().optional(),
    rootCauseCategory: z.enum(causeCategories, { message: `Choose a cause category: ${causeCategories.join(', ')}` }).nullable().optional(),
    rootCauseAnalysis: noteText('the root-cause analysis', { max: 5000 }).nullable().optional(),
    /** More lots concerned (containment follows `holdLots`). */
    addLots: z.array(ncrLotInput).max(100, 'Add at most 100 lots at a time').optional(),
    holdLots: z.boolean().optional(),
    /** More alarms linked. */
    addAlarmIds: z.array(recordId('Alarm id')).max(100, 'Link at most 100 alarms at a time').optional(),
    /** Decisions on lots; the lot's status follows (release, downgrade: released; rework: stays on hold; scrap: rejected). */
    dispositions: z.array(ncrDispositionInput).max(100, 'Decide at most 100 lots at a time').optional(),
    /** Approval by a quality manager, with a note. */
    approve: z.object({ note: noteText('an approval note', { min: 3, max: 2000 }) }).optional(),
    /** Closure: how the effectiveness of the actions was checked, and the verdict. */
    effectivenessCheck: noteText('the effectiveness check', { min: 10, max: 5000 }).nullable().optional(),
    effective: z.boolean().nullable().optional(),
  })
  .strict()
  .refine((o) => Object.keys(o).length > 0, { message: 'Nothing to change' });
export type UpdateNcrInput = z.infer<typeof updateNcrSchema>;

/** POST /api/v1/ncrs/:id/transitions. */
export const ncrTransitionSchema = z.object({
  to: z.enum(ncrStatuses, { message: `Choose a state: ${ncrStatuses.join(', ')}` }),
  /** Why; required to reopen a closed NCR or to go back to investigating. */
  reason: noteText('a reason', { min: 5, max: 2000 }).optional(),
});
export type NcrTransitionInput = z.infer<typeof ncrTransitionSchema>;

/** POST /api/v1/ncrs/:id/actions. */
export const createNcrActionSchema = z.object({
  kind: z.enum(ncrActionKinds, { message: 'Choose corrective or preventive' }),
  /** What is to be done. */
  description: noteText('what is to be done', { min: 5, max: 2000 }),
  ownerId: recordId('Owner id'),
  dueDate: plantDay('the due date'),
});
export type CreateNcrActionInput = z.infer<typeof createNcrActionSchema>;

/** PATCH /api/v1/ncrs/:id/actions/:actionId: owners record evidence and the done date; managers may change the rest. */
export const updateNcrActionSchema = z
  .object({
    description: noteText('what is to be done', { min: 5, max: 2000 }).optional(),
    ownerId: recordId('Owner id').optional(),
    dueDate: plantDay('the due date').optional(),
    /** null: not done after all. */
    doneDate: plantDay('the done date').nullable().optional(),
    evidence: noteText('the evidence', { max: 5000 }).nullable().optional(),
  })
  .strict()
  .refine((o) => Object.keys(o).length > 0, { message: 'Nothing to change' });
export type UpdateNcrActionInput = z.infer<typeof updateNcrActionSchema>;

/** GET /api/v1/ncrs query. */
export const listNcrsQuerySchema = z.object({
  status: z.enum(ncrStatuses).optional(),
  severity: z.enum(ncrSeverities).optional(),
  productId: recordId('Product id').optional(),
  assigneeId: recordId('User id').optional(),
  /** Part of the number, title or a lot number. */
  q: lineText('the search text', { max: 100 }).optional(),
  /** Only NCRs with an overdue action. */
  overdue: z.enum(['true', 'false']).transform((v) => v === 'true').optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});

/** :id of /api/v1/ncrs/:id, and :actionId / :attachmentId below it. */
export const ncrParamsSchema = z.object({ id: recordId('NCR id') });
export const ncrActionParamsSchema = z.object({ id: recordId('NCR id'), actionId: recordId('Action id') });
export const ncrAttachmentParamsSchema = z.object({ id: recordId('NCR id'), attachmentId: recordId('Attachment id') });

/** The note beside an attachment (multipart field `note`). */
export const ncrAttachmentFieldsSchema = z.object({ note: noteText('a note', { max: 1000 }).optional() });
