// Results as they arrived: lots, uploads with their files, measurements, saved column mappings.
import { sql } from 'drizzle-orm';
import { doublePrecision, index, integer, jsonb, pgEnum, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core';
import { storedFiles } from './files';
import { users } from './users';
import type { RowError } from '../../../shared/ingest/validate';
import type { UploadFormat } from '../../../shared/schemas/uploads';

export const uploadStatusEnum = pgEnum('upload_status', ['imported', 'rejected', 'voided']);
export const measurementSourceEnum = pgEnum('measurement_source', ['upload', 'manual']);

export const lots = pgTable(
  'lots',
  {
    id: serial('id').primaryKey(),
    lotNumber: text('lot_number').notNull().unique(),
    // References checked once per statement by trigger (migration 0004), not per row: see DEVELOPERS.md.
    productId: integer('product_id').notNull(),
    lineId: integer('line_id').notNull(),
    producedAt: timestamp('produced_at', { withTimezone: true }).notNull(),
    shift: text('shift'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  },
  // No index on (product, produced_at): lots are read by id or number, and the list of a product's lots
  // sorts a few thousand rows, while that index made storing a file of new lots about 40 % slower.
);

export const uploads = pgTable(
  'uploads',
  {
    id: serial('id').primaryKey(),
    fileName: text('file_name').notNull(),
    sha256: text('sha256').notNull(),
    uploadedBy: integer('uploaded_by').references(() => users.id),
    uploadedAt: timestamp('uploaded_at', { withTimezone: true }).notNull().defaultNow(),
    status: uploadStatusEnum('status').notNull(),
    format: text('format').$type<UploadFormat>().notNull().default('long'),
    rowsTotal: integer('rows_total').notNull(),
    rowsImported: integer('rows_imported').notNull().default(0),
    rowsRejected: integer('rows_rejected').notNull().default(0),
    /** Row-by-row validation errors of a rejected file. */
    errors: jsonb('errors').$type<RowError[]>(),
    /** Length of the file as received, in bytes. */
    sizeBytes: integer('size_bytes').notNull(),
    /** The file exactly as received, kept as evidence (stored_files; moved there from upload_file_parts by migration 0010). */
    fileId: integer('file_id')
      .notNull()
      .references(() => storedFiles.id),
    voidedAt: timestamp('voided_at', { withTimezone: true }),
    voidedBy: integer('voided_by').references(() => users.id),
    voidReason: text('void_reason'),
  },
  // The same bytes may be imported once; a rejected file may come again after it was fixed elsewhere.
  (t) => [uniqueIndex('uploads_sha256_kept_key').on(t.sha256).where(sql`status <> 'rejected'`)],
);

export const measurements = pgTable(
  'measurements',
  {
    id: serial('id').primaryKey(),
    // lot, characteristic, upload and user references are checked once per statement by trigger
    // (migration 0004), not per row: a 100,000-row upload pays one join instead of 400,000 lookups.
    lotId: integer('lot_id').notNull(),
    characteristicId: integer('characteristic_id').notNull(),
    replicate: integer('replicate').notNull(),
    value: doublePrecision('value').notNull(),
    testedAt: timestamp('tested_at', { withTimezone: true }),
    operator: text('operator'),
    note: text('note'),
    source: measurementSourceEnum('source').notNull(),
    uploadId: integer('upload_id'),
    enteredBy: integer('entered_by'),
    createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
    /** Set when the upload was voided: kept for the record, left out of every calculation. */
    voidedAt: timestamp('voided_at', { withTimezone: true }),
  },
  // Two B-trees a new row, not four: the live key leads with the characteristic, so it also serves the
  // SPC run's reads of one characteristic, and queries by lot name the lot's characteristics; voided rows
  // have a small index of their own, with the id so that the newest is read from the index alone; an upload's rows lie together on disk in upload order, which a BRIN
  // index finds for a void at almost no cost per row.
  (t) => [
    uniqueIndex('measurements_live_key').on(t.characteristicId, t.lotId, t.replicate).where(sql`voided_at is null`),
    index('measurements_voided_idx').on(t.characteristicId, t.id).where(sql`voided_at is not null`),
    index('measurements_upload_idx').using('brin', t.uploadId),
  ],
);
/** Saved column mappings for lab exports that are not in the canonical layout. */
export const columnMappings = pgTable('column_mappings', {
  id: serial('id').primaryKey(),
  name: text('name').notNull().unique(),
  mapping: jsonb('mapping').notNull(),
  createdBy: integer('created_by').references(() => users.id),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
});
