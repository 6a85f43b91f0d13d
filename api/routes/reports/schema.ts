// The three capability report endpoints (preview, PDF, CSV) read one query: the report page builds its
// links from the same schema (shared/schemas/reports.ts), so what the page offers the API accepts.
export { capabilityReportQuerySchema } from '@shared/schemas/reports';
