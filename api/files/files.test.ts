// The stored-file service against the test database: bytes back as they went in, a type read from the
// bytes, and damaged bytes refused. Signatures: PDF (ISO 32000-1 §7.5.2), PNG (ISO/IEC 15948 §5.2),
// JPEG (ITU-T T.81, start-of-image marker FF D8 followed by a marker's FF).
import { createHash, randomBytes } from 'node:crypto';
import { afterAll, describe, expect, it } from 'vitest';
import { sql } from 'drizzle-orm';
import type pg from 'pg';
import { createTestApi } from '@tests/support/api';
import { detectContentType } from './content-type';
import { FILE_PART_BYTES, StoredFileDamaged, UnacceptedContent, getFile, putFile } from './store';

const api = createTestApi();
afterAll(() => api.close());

/** Runs `work` on one connection inside a transaction that commits. */
async function inTransaction<T>(work: (client: pg.PoolClient) => Promise<T>): Promise<T> {
  const client = await api.db.$client.connect();
  try {
    await client.query('begin');
    const result = await work(client);
    await client.query('commit');
    return result;
  } catch (err) {
    await client.query('rollback');
    throw err;
  } finally {
    client.release();
  }
}

describe('detectContentType', () => {
  it('reads PDF, PNG and JPEG by their leading bytes, whatever follows', () => {
    expect(detectContentType(Buffer.from('%PDF-1.4\n%âãÏÓ\n'))).toBe('application/pdf');
    expect(detectContentType(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]))).toBe('image/png');
    expect(detectContentType(Buffer.from([0xff, 0xd8, 0xff, 0xe1, 0, 0]))).toBe('image/jpeg');
    // A PNG signature without its line-ending check bytes is not a PNG.
    expect(detectContentType(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0a, 0x1a, 0x0a, 0x00]))).toBe('application/octet-stream');
  });

  it('tells CSV from other text by the first line, and text from binary by NUL bytes', () => {
    expect(detectContentType(Buffer.from('lot,product,value\r\nL1-1,HVL25,30.5\r\n'))).toBe('text/csv');
    expect(detectContentType(Buffer.from('lot;product;value\nL1-1;HVL25;30,5\n'))).toBe('text/csv');
    expect(detectContentType(Buffer.from('lot\tproduct\n'))).toBe('text/csv');
    // Windows-1252 "°" (0xB0) is text, not binary.
    expect(detectContentType(Buffer.from([0x4c, 0x61, 0x62, 0x20, 0x32, 0x31, 0x20, 0xb0, 0x43, 0x0a]))).toBe('text/plain');
    expect(detectContentType(Buffer.alloc(0))).toBe('text/plain');
    expect(detectContentType(Buffer.from('a,b\n1,\u0000\n'))).toBe('application/octet-stream');
  });
});

describe('putFile and getFile', () => {
  it('give back a file of several parts byte for byte, with its SHA-256 and type', async () => {
    const bytes = Buffer.concat([Buffer.from('%PDF-1.7\n'), randomBytes(FILE_PART_BYTES + 10)]);
    const stored = await inTransaction((client) => putFile(client, { fileName: 'press-calibration.pdf', bytes, createdBy: null, accept: ['application/pdf', 'image/png'] }));
    expect(stored).toMatchObject({ fileName: 'press-calibration.pdf', sizeBytes: bytes.length, contentType: 'application/pdf' });
    // Node's SHA-256 (OpenSSL) as the independent reference.
    expect(stored.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    const back = await getFile(api.db, stored.id);
    expect(Buffer.compare(back!.bytes, bytes)).toBe(0);
    expect(back!.contentType).toBe('application/pdf');
    expect(await getFile(api.db, 2_147_483_647)).toBeNull();
  });

  it('refuses a type the record does not take, and stores nothing', async () => {
    const before = await api.db.execute<{ n: number }>(sql`select count(*)::int as n from stored_files`);
    const refused = inTransaction((client) => putFile(client, { fileName: 'photo.csv', bytes: Buffer.from([0xff, 0xd8, 0xff, 0xdb]), createdBy: null, accept: ['text/csv'] }));
    await expect(refused).rejects.toBeInstanceOf(UnacceptedContent);
    await expect(refused).rejects.toThrow('The file is image/jpeg, and only text/csv can be kept here');
    const after = await api.db.execute<{ n: number }>(sql`select count(*)::int as n from stored_files`);
    expect(after.rows[0].n).toBe(before.rows[0].n);
  });

  it('refuses to hand out bytes that no longer match their length or SHA-256', async () => {
    const stored = await inTransaction((client) => putFile(client, { fileName: 'notes.txt', bytes: Buffer.from('Lab at 21 °C\n'), createdBy: null }));
    await api.db.execute(sql`update stored_file_parts set bytes = overlay(bytes placing '\x39'::bytea from 2 for 1) where file_id = ${stored.id}`);
    await expect(getFile(api.db, stored.id)).rejects.toBeInstanceOf(StoredFileDamaged);
    await api.db.execute(sql`update stored_file_parts set bytes = bytes || '\x0a'::bytea where file_id = ${stored.id}`);
    await expect(getFile(api.db, stored.id)).rejects.toMatchObject({ storedBytes: stored.sizeBytes + 1, recordedBytes: stored.sizeBytes });
  });
});
