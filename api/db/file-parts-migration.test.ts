// Migration 0008 moves every kept upload file into upload_file_parts, and migration 0010 moves them on
// into stored_files and stored_file_parts. A database at migration 0007 with files of awkward lengths
// (empty, one byte, exactly one part, one byte over, several parts) and of several kinds is migrated, and
// each file must come back byte for byte after each move, its SHA-256 (Node's, OpenSSL) the one recorded
// at upload, its content type the one api/files/content-type.ts reads from the same bytes.
import { createHash, randomBytes } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { databaseUrl } from '@tests/support/api';
import { migrationsFolder } from '../paths';
import { FILE_PART_BYTES } from '@api/files/store';
import { detectContentType } from '@api/files/content-type';

const scratch = `prismline_migration_${process.pid}`;
const admin = new pg.Client({ connectionString: databaseUrl() });
let db: pg.Client | undefined;

afterAll(async () => {
  await db?.end();
  await admin.query(`drop database if exists ${scratch}`);
  await admin.end();
});

/** Runs one migration file as drizzle-kit wrote it: statements between its breakpoints. */
async function apply(client: pg.Client, tag: string): Promise<void> {
  const text = readFileSync(join(migrationsFolder, `${tag}.sql`), 'utf8');
  for (const statement of text.split('--> statement-breakpoint')) if (statement.trim()) await client.query(statement);
}

describe('migrations 0008 and 0010: upload files in parts, then stored files', () => {
  it('splits every kept file into parts that join back to the same bytes, then moves them to stored files', async () => {
    await admin.connect();
    await admin.query(`drop database if exists ${scratch}`);
    await admin.query(`create database ${scratch}`);
    const url = new URL(databaseUrl());
    url.pathname = `/${scratch}`;
    db = new pg.Client({ connectionString: url.toString() });
    await db.connect();
    const journal = JSON.parse(readFileSync(join(migrationsFolder, 'meta', '_journal.json'), 'utf8')) as { entries: { tag: string }[] };
    const tags = journal.entries.map((e) => e.tag);
    const at0008 = tags.indexOf('0008_upload_file_parts');
    for (const tag of tags.slice(0, at0008)) await apply(db, tag);

    const random = [0, 1, FILE_PART_BYTES, FILE_PART_BYTES + 1, 2 * FILE_PART_BYTES + 12_345].map((n) => randomBytes(n));
    // Leading bytes of PDF (ISO 32000-1 §7.5.2), PNG (ISO/IEC 15948 §5.2) and JPEG (ITU-T T.81, SOI marker).
    const kinds = [
      Buffer.from('lot;product;value\r\nL1-1;HVL25;30,5\r\n', 'latin1'),
      Buffer.from('Lab notes without a delimiter\nsecond line, with a comma\n'),
      Buffer.concat([Buffer.from('%PDF-1.7\n'), randomBytes(FILE_PART_BYTES)]),
      Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]),
      Buffer.from([0xff, 0xd8, 0xff, 0xe0, 0, 16, 0x4a, 0x46, 0x49, 0x46]),
      Buffer.concat([Buffer.from('a,b\n1,2\n'), Buffer.from([0]), Buffer.from('\n')]),
    ];
    const files = [...random, ...kinds];
    const sizes = files.map((f) => f.length);
    for (const [i, file] of files.entries()) {
      await db.query(`insert into uploads (file_name, sha256, status, rows_total, content) values ($1, $2, 'rejected', 0, $3)`, [`file-${i}.csv`, createHash('sha256').update(file).digest('hex'), file]);
    }
    for (const tag of tags.slice(at0008, at0008 + 2)) await apply(db, tag);

    const columns = await db.query(`select column_name from information_schema.columns where table_name = 'uploads' and column_name in ('content', 'size_bytes')`);
    expect(columns.rows.map((r) => r.column_name)).toEqual(['size_bytes']);
    const back = await db.query<{ file_name: string; sha256: string; size_bytes: number; parts: number; whole: Buffer | null }>(
      `select u.file_name, u.sha256, u.size_bytes, count(p.part)::int as parts, string_agg(p.bytes, ''::bytea order by p.part) as whole
       from uploads u left join upload_file_parts p on p.upload_id = u.id group by u.id order by u.id`,
    );
    expect(back.rows.map((r) => [r.size_bytes, r.parts])).toEqual(sizes.map((n) => [n, Math.ceil(n / FILE_PART_BYTES)]));
    for (const [i, r] of back.rows.entries()) {
      const whole = r.whole ?? Buffer.alloc(0);
      expect(Buffer.compare(whole, files[i])).toBe(0);
      expect(createHash('sha256').update(whole).digest('hex')).toBe(r.sha256);
    }

    const at0010 = tags.indexOf('0010_stored_files');
    expect(at0010).toBe(at0008 + 2);
    for (const tag of tags.slice(at0010, at0010 + 2)) await apply(db, tag);
    const tables = await db.query(`select table_name from information_schema.tables where table_name in ('upload_file_parts', 'stored_files', 'stored_file_parts') order by table_name`);
    expect(tables.rows.map((r) => r.table_name)).toEqual(['stored_file_parts', 'stored_files']);
    const moved = await db.query<{ upload_sha256: string; sha256: string; size_bytes: number; content_type: string; file_name: string; parts: number; whole: Buffer | null }>(
      `select u.sha256 as upload_sha256, f.sha256, f.size_bytes, f.content_type, f.file_name, count(p.part)::int as parts, string_agg(p.bytes, ''::bytea order by p.part) as whole
       from uploads u join stored_files f on f.id = u.file_id left join stored_file_parts p on p.file_id = f.id group by u.id, f.id order by u.id`,
    );
    expect(moved.rows.map((r) => [r.size_bytes, r.parts])).toEqual(sizes.map((n) => [n, Math.ceil(n / FILE_PART_BYTES)]));
    expect(moved.rows.map((r) => r.content_type)).toEqual(files.map(detectContentType));
    expect(moved.rows.slice(random.length).map((r) => r.content_type)).toEqual(['text/csv', 'text/plain', 'application/pdf', 'image/png', 'image/jpeg', 'application/octet-stream']);
    for (const [i, r] of moved.rows.entries()) {
      const whole = r.whole ?? Buffer.alloc(0);
      expect(Buffer.compare(whole, files[i])).toBe(0);
      expect(r.sha256).toBe(createHash('sha256').update(whole).digest('hex'));
      expect(r.sha256).toBe(r.upload_sha256);
      expect(r.file_name).toBe(`file-${i}.csv`);
    }
    // New files take ids after the moved ones.
    const next = await db.query<{ id: number }>(`insert into stored_files (sha256, size_bytes, content_type, file_name) values ('', 0, 'text/plain', 'new.txt') returning id`);
    expect(next.rows[0].id).toBe(files.length + 1);
  });
});
