// Uploads of results files as the API answers them and the results area reads them. Kept free of zod.
import type { RowError } from '../ingest/validate';

export const uploadStatuses = ['imported', 'rejected', 'voided'] as const;
export type UploadStatus = (typeof uploadStatuses)[number];
/** 'long': one result per row; 'wide': one row per lot, a column per characteristic. */
export type UploadFormat = 'long' | 'wide';

/** GET /api/v1/uploads items: one file received, newest first. */
export interface UploadListItem {
  id: number;
  fileName: string;
  sha256: string;
  /** Size of the file as received. */
  sizeBytes: number;
  uploadedAt: string;
  status: UploadStatus;
  format: UploadFormat;
  rowsTotal: number;
  rowsImported: number;
  rowsRejected: number;
  voidedAt: string | null;
  voidReason: string | null;
  uploadedById: number | null;
  uploadedByName: string | null;
}

/** GET /api/v1/uploads/:id: the list item with the rows a rejected file needs corrected. */
export interface UploadDetail extends UploadListItem {
  errors: RowError[] | null;
}

/** 201 of POST /api/v1/uploads: every row of the file is stored. */
export interface UploadImported {
  id: number;
  rowsImported: number;
}

/** POST /api/v1/uploads/:id/void */
export interface UploadVoided {
  id: number;
  status: 'voided';
  /** Results that left every calculation and stay in the record. */
  measurementsVoided: number;
}
