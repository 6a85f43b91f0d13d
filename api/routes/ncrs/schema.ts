// The NCR endpoints' request schemas live in shared/, where the NCR forms read them too.
export {
  createNcrActionSchema,
  createNcrSchema,
  listNcrsQuerySchema,
  ncrActionParamsSchema,
  ncrAttachmentFieldsSchema,
  ncrAttachmentParamsSchema,
  ncrParamsSchema,
  ncrTransitionSchema,
  updateNcrActionSchema,
  updateNcrSchema,
} from '@shared/schemas/ncr-requests';
