// The stored-file service: bytes kept in PostgreSQL exactly as they arrived (stored_files and
// stored_file_parts), written by binary COPY a megabyte a part, and handed back only while their length
// and SHA-256 still match what was recorded on arrival. Uploads keep their results file here; a
// nonconformance report's attachments will too.
import { createHash } from 'node:crypto';
import { once } from 'node:events';
import type pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import { asc, eq } from 'drizzle-orm';
import type { Database } from '@api/db/client';
import { storedFileParts, storedFiles } from '@api/db/schema';
import { BinaryCopyWriter } from '@api/ingest/copy-binary';
import { type ContentType, detectContentType } from './content-type';

/** Bytes of a stored file in one row of stored_file_parts; migrations 0008 and 0010 split the files kept before them alike. */
export const FILE_PART_BYTES = 1 << 20;

/** A file's fingerprint as recorded on arrival: SHA-256 in hex. */
export const fileFingerprint = (bytes: Buffer): string => createHash('sha256').update(bytes).digest('hex');

/** The stored bytes no longer have the length or SHA-256 recorded on arrival. */
export class StoredFileDamaged extends Error {
  constructor(
    readonly fileId: number,
    readonly storedBytes: number,
    readonly recordedBytes: number,
  ) {
    super(`Stored file ${fileId} no longer matches the size and SHA-256 recorded when it arrived`);
  }
}

/** The bytes are not of a type the record takes. */
export class UnacceptedContent extends Error {
  constructor(
    readonly found: ContentType,
    readonly accepted: readonly ContentType[],
  ) {
    super(`The file is ${found}, and only ${accepted.join(', ')} can be kept here`);
  }
}

export interface NewFile {
  /** Taken beforehand with reserveFileId when a record must refer to the file before it is stored. */
  id?: number;
  fileName: string;
  bytes: Buffer;
  createdBy: number | null;
  /** Already taken by the caller (fileFingerprint), so a large file is not hashed twice. */
  sha256?: string;
  /** Content types the record takes; any, when absent. */
  accept?: readonly ContentType[];
}

export interface StoredFile {
  id: number;
  fileName: string;
  sha256: string;
  sizeBytes: number;
  contentType: ContentType;
}

/** A new file's id from the sequence, so that the records referring to it can be written with it at once. */
export async function reserveFileId(client: pg.ClientBase): Promise<number> {
  const res = await client.query<{ id: number }>(`select nextval(pg_get_serial_sequence('stored_files', 'id'))::int as id`);
  return res.rows[0].id;
}

/**
 * Stores a file in the caller's transaction. With an id given, its row and parts are queued on the
 * connection before this returns its promise, so a record referring to it may be queued right after.
 */
export async function putFile(client: pg.ClientBase, file: NewFile): Promise<StoredFile> {
  const contentType = detectContentType(file.bytes);
  if (file.accept && !file.accept.includes(contentType)) throw new UnacceptedContent(contentType, file.accept);
  const sha256 = file.sha256 ?? fileFingerprint(file.bytes);
  const id = file.id ?? (await reserveFileId(client));
  const row = client.query(`insert into stored_files (id, sha256, size_bytes, content_type, file_name, created_by) values ($1, $2, $3, $4, $5, $6)`, [
    id,
    sha256,
    file.bytes.length,
    contentType,
    file.fileName,
    file.createdBy,
  ]);
  await Promise.all([row, copyParts(client, id, file.bytes)]);
  return { id, fileName: file.fileName, sha256, sizeBytes: file.bytes.length, contentType };
}

/** The bytes in parts of FILE_PART_BYTES by binary COPY, each part sent as it is, never copied into one buffer. */
async function copyParts(client: pg.ClientBase, fileId: number, bytes: Buffer): Promise<void> {
  if (bytes.length === 0) return;
  const stream = client.query(copyFrom('COPY stored_file_parts (file_id, part, bytes) FROM STDIN (FORMAT binary)'));
  const done = once(stream, 'finish');
  const w = new BinaryCopyWriter(64);
  for (let part = 0, at = 0; at < bytes.length; part++, at += FILE_PART_BYTES) {
    const piece = bytes.subarray(at, at + FILE_PART_BYTES);
    stream.write(w.row(3).int4(fileId).int4(part).byteaLength(piece.length).take());
    stream.write(piece);
  }
  stream.end(BinaryCopyWriter.trailer);
  await done;
}

/** A stored file with its bytes, or null when there is none with that id; StoredFileDamaged when the bytes changed. */
export async function getFile(db: Pick<Database, 'select'>, id: number): Promise<(StoredFile & { bytes: Buffer }) | null> {
  const [file] = await db.select().from(storedFiles).where(eq(storedFiles.id, id));
  if (!file) return null;
  const parts = await db.select({ bytes: storedFileParts.bytes }).from(storedFileParts).where(eq(storedFileParts.fileId, id)).orderBy(asc(storedFileParts.part));
  const bytes = Buffer.concat(parts.map((p) => p.bytes));
  if (bytes.length !== file.sizeBytes || fileFingerprint(bytes) !== file.sha256) throw new StoredFileDamaged(id, bytes.length, file.sizeBytes);
  return { id, fileName: file.fileName, sha256: file.sha256, sizeBytes: file.sizeBytes, contentType: file.contentType as ContentType, bytes };
}
