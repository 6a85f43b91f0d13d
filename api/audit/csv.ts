// The audit trail as CSV, streamed: PostgreSQL sends the rows by binary COPY (no per-row protocol, no
// JavaScript row objects), each row is written with @shared/csv's own csvRow, so the export follows the
// product's CSV rules by construction, and the next rows are read only once the reader has taken the last
// ones: memory stays flat for a million events.
import type { Writable } from 'node:stream';
import { sql } from 'drizzle-orm';
import { PgDialect } from 'drizzle-orm/pg-core';
import { to as copyTo } from 'pg-copy-streams';
import { CSV_BOM, csvRow } from '@shared/csv';
import type { Database } from '@api/db/client';
import { auditBounds, auditWhere, type AuditBounds, type AuditFilter } from './filter';

export type { AuditFilter } from './filter';

/** The export's columns, in order. */
export const AUDIT_CSV_HEADER = ['seq', 'at', 'actor', 'role', 'entity', 'entity_id', 'action', 'reason', 'before', 'after', 'hash', 'prev_hash'] as const;

/** What the actor cell says when the system did it by itself (the list says the same). */
export const SYSTEM_ACTOR = 'the system';

/** The plant's zone: the trail is the plant's, and its times are read in the plant's clock. */
export async function auditTimeZone(db: Pick<Database, 'execute'>): Promise<string> {
  const r = await db.execute<{ time_zone: string }>(sql`select time_zone from plants order by id limit 1`);
  return r.rows[0]?.time_zone ?? 'UTC';
}

const SETTING = 'prismline_audit.';
const boundKeys = ['entity', 'entityId', 'actorId', 'system', 'action', 'fromAt', 'toAt', 'pattern'] as const satisfies readonly (keyof AuditBounds)[];
const settingName = (key: keyof AuditBounds) => `${SETTING}${key.toLowerCase()}`;

/**
 * The SELECT the COPY runs: every cell as text (null stays null), the time in the transaction's zone (the
 * plant's) as ISO 8601 with its offset — the text plantIso writes. COPY takes no parameters, so the filter's
 * values are settings of the transaction, each read once (an uncorrelated subquery).
 */
function exportQuery(): string {
  const where = auditWhere((key) => sql.raw(`(select nullif(current_setting('${settingName(key)}'), ''))`));
  const query = new PgDialect().sqlToQuery(sql`
    select e.seq::text, to_char(e.at, 'YYYY-MM-DD"T"HH24:MI:SSTZH:TZM'),
           coalesce(u.name, case when e.actor_id is null then ${sql.raw(`'${SYSTEM_ACTOR}'`)} end), u.role::text,
           e.entity, e.entity_id, e.action, e.reason, e.before::text, e.after::text, e.hash, e.prev_hash
    from audit_events e left join users u on u.id = e.actor_id
    where ${where}
    order by e.seq`);
  if (query.params.length) throw new Error('The export query must carry no parameters: COPY takes none');
  return `copy (${query.sql}) to stdout (format binary)`;
}

const SIGNATURE = Buffer.from('PGCOPY\n\xff\r\n\0', 'latin1');

/**
 * Reads PostgreSQL's binary COPY stream (the "Binary Format" section of the COPY page of the PostgreSQL
 * manual): a header, then per row a 16-bit field count and each field as a 32-bit length (-1: null) and its
 * bytes, and a count of -1 at the end. Chunks split rows anywhere; the rest waits for the next chunk.
 */
class BinaryCopyRows {
  private rest: Buffer = Buffer.alloc(0);
  private headerRead = false;
  done = false;

  /** The complete rows of what has arrived so far, each a list of text cells. */
  push(chunk: Buffer): (string | null)[][] {
    const buf = this.rest.length ? Buffer.concat([this.rest, chunk]) : chunk;
    let pos = 0;
    if (!this.headerRead) {
      if (buf.length < 19) return this.keep(buf, 0, []);
      if (!buf.subarray(0, 11).equals(SIGNATURE)) throw new Error('Not a binary COPY stream');
      pos = 19 + buf.readInt32BE(15);
      this.headerRead = true;
    }
    const rows: (string | null)[][] = [];
    while (pos + 2 <= buf.length) {
      const fields = buf.readInt16BE(pos);
      if (fields === -1) {
        this.done = true;
        return this.keep(buf, buf.length, rows);
      }
      let at = pos + 2;
      const row: (string | null)[] = [];
      for (let i = 0; i < fields; i++) {
        if (at + 4 > buf.length) return this.keep(buf, pos, rows);
        const length = buf.readInt32BE(at);
        at += 4;
        if (length === -1) {
          row.push(null);
          continue;
        }
        if (at + length > buf.length) return this.keep(buf, pos, rows);
        row.push(buf.toString('utf8', at, at + length));
        at += length;
      }
      rows.push(row);
      pos = at;
    }
    return this.keep(buf, pos, rows);
  }

  private keep(buf: Buffer, from: number, rows: (string | null)[][]) {
    // A copy, so the rest does not hold the whole chunk it came from.
    this.rest = from < buf.length ? Buffer.from(buf.subarray(from)) : Buffer.alloc(0);
    return rows;
  }
}

/** Resolves when the stream takes writes again; rejects when it closed or failed first (the reader went away). */
function drained(out: Writable): Promise<void> {
  return new Promise((resolve, reject) => {
    const done = (err?: Error) => {
      out.off('drain', onDrain).off('close', onClose).off('error', done);
      if (err) reject(err);
      else resolve();
    };
    const onDrain = () => done();
    const onClose = () => done(new Error('The reader of the audit export went away'));
    out.on('drain', onDrain).on('close', onClose).on('error', done);
  });
}

/**
 * Writes the audit events the filter picks, oldest first, as a CSV document (byte-order mark, header, one
 * row an event) to `out`, and answers how many events it wrote. Does not end `out`: the route ends the
 * response, the audit pack closes its ZIP entry. Times are ISO 8601 in the plant's zone with its offset;
 * before and after are their JSON as PostgreSQL prints it (the text the chain's hash is taken over).
 */
export async function writeAuditCsv(db: Database, filter: AuditFilter, out: Writable): Promise<number> {
  const timeZone = await auditTimeZone(db);
  const bounds = auditBounds(filter, timeZone);
  const client = await db.$client.connect();
  let failed: Error | undefined;
  let rows = 0;
  try {
    await client.query('begin read only');
    const settings = boundKeys.map((k) => {
      const v = bounds[k];
      return v === null ? '' : String(v);
    });
    await client.query(`select set_config('timezone', $1, true), ${boundKeys.map((k, i) => `set_config('${settingName(k)}', $${i + 2}, true)`).join(', ')}`, [
      timeZone,
      ...settings,
    ]);
    if (!out.write(CSV_BOM + csvRow(AUDIT_CSV_HEADER))) await drained(out);
    const reader = new BinaryCopyRows();
    const copy = client.query(copyTo(exportQuery()));
    for await (const chunk of copy as AsyncIterable<Buffer>) {
      const batch = reader.push(chunk);
      if (!batch.length) continue;
      let text = '';
      for (const cells of batch) text += csvRow(cells);
      rows += batch.length;
      if (!out.write(text)) await drained(out);
    }
    if (!reader.done) throw new Error('The audit export ended before PostgreSQL finished it');
    await client.query('commit');
    return rows;
  } catch (err) {
    failed = err as Error;
    throw err;
  } finally {
    // After a failure the connection may be mid-COPY: it is closed rather than handed back to the pool.
    client.release(failed);
  }
}
