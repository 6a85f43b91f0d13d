// Migration 0008 moves every kept upload file into upload_file_parts. A database at migration 0007 with
// files of awkward lengths (empty, one byte, exactly one part, one byte over, several parts) is migrated,
// and each file must come back byte for byte, its SHA-256 (Node's, OpenSSL) the one recorded at upload.
import { createHash, randomBytes } from 'node:crypto';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { databaseUrl } from '@tests/support/api';
import { migrationsFolder } from '../paths';
import { FILE_PART_BYTES } from '../ingest/import';

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

describe('migration 0008: upload files in parts', () => {
  it('splits every kept file into parts that join back to the same bytes', async () => {
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

    const sizes = [0, 1, FILE_PART_BYTES, FILE_PART_BYTES + 1, 2 * FILE_PART_BYTES + 12_345];
    const files = sizes.map((n) => randomBytes(n));
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
  });
});
