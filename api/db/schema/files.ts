// Stored files: bytes kept in PostgreSQL as they arrived, with their SHA-256 and size, for any record
// that keeps a file (an upload's results file now, a nonconformance report's attachments later).
import { customType, integer, pgTable, primaryKey, serial, text, timestamp } from 'drizzle-orm/pg-core';
import { users } from './users';

const bytea = customType<{ data: Buffer }>({ dataType: () => 'bytea' });

export const storedFiles = pgTable('stored_files', {
  id: serial('id').primaryKey(),
  /** SHA-256 of the bytes in hex, taken on arrival: the bytes are handed out only while they still match it. */
  sha256: text('sha256').notNull(),
  sizeBytes: integer('size_bytes').notNull(),
  /** Read from the bytes, never from the sender's word: text/csv, text/plain, application/pdf, image/png, image/jpeg or application/octet-stream. */
  contentType: text('content_type').notNull(),
  fileName: text('file_name').notNull(),
  createdBy: integer('created_by').references(() => users.id),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
});

/**
 * A stored file's bytes in parts of FILE_PART_BYTES (api/files/store.ts), in order, packed by LZ4 where
 * the server has it. Parts go in by binary COPY a megabyte at a time: one 10 MB value as a query
 * parameter cost PostgreSQL about five times as long (copies of the whole value at each step).
 */
export const storedFileParts = pgTable(
  'stored_file_parts',
  {
    fileId: integer('file_id')
      .notNull()
      .references(() => storedFiles.id, { onDelete: 'cascade' }),
    /** 0 for the first megabyte, then 1, 2, … */
    part: integer('part').notNull(),
    bytes: bytea('bytes').notNull(),
  },
  (t) => [primaryKey({ columns: [t.fileId, t.part] })],
);
