// The pack's request schema lives in shared/, beside the capability report's whose period rules it reads.
export { auditPackQuerySchema } from '@shared/schemas/reports';
