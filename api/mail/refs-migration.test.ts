// The migration that gives outbox messages their references (mail_refs) keeps what the messages were
// about: a database with messages of one, several and no alarms is migrated, and each message's
// alarm ids come back, in order, as refs.alarmIds.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import pg from 'pg';
import { afterAll, describe, expect, it } from 'vitest';
import { databaseUrl } from '@tests/support/api';
import { migrationsFolder } from '../paths';

const scratch = `prismline_mail_refs_${process.pid}`;
const server = new pg.Client({ connectionString: databaseUrl() });
const url = new URL(databaseUrl());
url.pathname = `/${scratch}`;
const db = new pg.Client({ connectionString: url.toString() });

afterAll(async () => {
  await db.end().catch(() => undefined);
  await server.query(`drop database if exists ${scratch}`);
  await server.end();
});

const migrations = (JSON.parse(readFileSync(join(migrationsFolder, 'meta', '_journal.json'), 'utf8')) as { entries: { tag: string }[] }).entries.map((e) => e.tag);
const statements = (tag: string) => readFileSync(join(migrationsFolder, `${tag}.sql`), 'utf8').split('--> statement-breakpoint').filter((s) => s.trim());

describe('migration mail_refs', () => {
  it('copies each message’s alarm ids into its references before alarm_ids goes', async () => {
    await server.connect();
    await server.query(`drop database if exists ${scratch}`);
    await server.query(`create database ${scratch}`);
    await db.connect();
    const at = migrations.findIndex((tag) => tag.endsWith('_mail_refs'));
    expect(at).toBeGreaterThan(0);
    for (const tag of migrations.slice(0, at)) for (const s of statements(tag)) await db.query(s);

    await db.query(`
      insert into mail_outbox (dedupe_key, kind, to_address, subject, text_body, html_body, alarm_ids)
      values ('alarm:7:user:1', 'alarm', 'a@harrowvale.example', 's', 't', 'h', '{7}'),
             ('digest:1:2026-12-01:user:1', 'digest', 'a@harrowvale.example', 's', 't', 'h', '{9,3,12}'),
             ('nothing', 'alarm', 'a@harrowvale.example', 's', 't', 'h', '{}')`);
    for (const tag of migrations.slice(at, at + 1)) for (const s of statements(tag)) await db.query(s);

    const rows = await db.query<{ dedupe_key: string; refs: unknown }>('select dedupe_key, refs from mail_outbox order by id');
    expect(rows.rows).toEqual([
      { dedupe_key: 'alarm:7:user:1', refs: { alarmIds: [7] } },
      { dedupe_key: 'digest:1:2026-12-01:user:1', refs: { alarmIds: [9, 3, 12] } },
      { dedupe_key: 'nothing', refs: { alarmIds: [] } },
    ]);
    const columns = await db.query(`select column_name from information_schema.columns where table_name = 'mail_outbox' and column_name in ('alarm_ids', 'refs')`);
    expect(columns.rows).toEqual([{ column_name: 'refs' }]);
  });
});
