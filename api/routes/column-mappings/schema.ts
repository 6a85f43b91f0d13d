/** POST /api/v1/column-mappings body: shared with the upload page that saves it. */
export { saveMappingSchema, type SaveMappingInput } from '@shared/ingest';
