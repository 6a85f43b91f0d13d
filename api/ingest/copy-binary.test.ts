// The binary COPY writer read back by PostgreSQL itself: its binary input functions (PostgreSQL manual,
// COPY "Binary Format"; int4recv, float8recv, timestamptz_recv, textrecv) are the reference.
import { once } from 'node:events';
import pg from 'pg';
import { from as copyFrom } from 'pg-copy-streams';
import { afterAll, describe, expect, it } from 'vitest';
import { databaseUrl } from '@tests/support/api';
import { BinaryCopyWriter } from './copy-binary';

const client = new pg.Client({ connectionString: databaseUrl() });
const ready = client.connect();
afterAll(() => client.end());

describe('BinaryCopyWriter', () => {
  it('writes integers, doubles, times, text and nulls that PostgreSQL reads back unchanged', async () => {
    await ready;
    await client.query('create temp table copied (i int, f float8, t timestamptz, s text)');
    const rows: [number | null, number | null, number | null, string | null][] = [
      [0, 0, Date.parse('2000-01-01T00:00:00Z'), ''],
      [-2_147_483_648, -0.5, Date.parse('1970-01-01T00:00:00Z'), 'tab\there, line\nbreak, back\\slash, "quote"'],
      [2_147_483_647, 1e300, Date.parse('1900-03-01T12:34:56.789Z'), 'Prüfkörper · 40 × 40 × 160 mm'],
      [146, 0.1 + 0.2, Date.parse('2999-12-31T23:59:59.999Z'), null],
      [null, null, null, 'after nulls'],
      // Short text is copied character by character while ASCII; one that is not falls back to UTF-8.
      [1, 2, Date.parse('2026-11-30T06:15:00Z'), 'AT'],
      [2, 3, Date.parse('2026-11-30T06:15:00Z'), 'Lab at 14 °C'],
      [3, 4, Date.parse('2026-11-30T06:15:00Z'), 'é'],
      [4, 5, Date.parse('2026-11-30T06:15:00Z'), 'exactly thirty-two characters!!!'],
    ];
    const w = new BinaryCopyWriter(16);
    for (const [i, f, t, s] of rows) {
      w.row(4);
      if (i === null) w.null();
      else w.int4(i);
      if (f === null) w.null();
      else w.float8(f);
      w.timestamptz(t).text(s);
    }
    const stream = client.query(copyFrom('COPY copied FROM STDIN (FORMAT binary)'));
    const done = once(stream, 'finish');
    stream.end(w.finish());
    await done;
    const back = await client.query<{ i: number | null; f: number | null; t: Date | null; s: string | null }>('select i, f, t, s from copied');
    expect(back.rows.map((r) => [r.i, r.f, r.t === null ? null : r.t.getTime(), r.s])).toEqual(rows);
  });

  it('sends a large bytea beside the writer, part by part, and PostgreSQL keeps every byte (bytearead)', async () => {
    await ready;
    await client.query('create temp table parts (n int, part int, bytes bytea)');
    // Every byte value, and a part boundary inside a multi-byte UTF-8 character.
    const file = Buffer.concat([Buffer.from(Array.from({ length: 256 }, (_, i) => i)), Buffer.from('Prüfkörper · 40 × 40 × 160 mm\r\n'.repeat(40))]);
    const partBytes = 301;
    const w = new BinaryCopyWriter(16);
    const stream = client.query(copyFrom('COPY parts FROM STDIN (FORMAT binary)'));
    const done = once(stream, 'finish');
    let parts = 0;
    for (let at = 0; at < file.length; at += partBytes, parts++) {
      const bytes = file.subarray(at, at + partBytes);
      stream.write(w.row(3).int4(7).int4(parts).byteaLength(bytes.length).take());
      stream.write(bytes);
    }
    stream.end(BinaryCopyWriter.trailer);
    await done;
    const back = await client.query<{ n: string; whole: Buffer }>(`select count(*) as n, string_agg(bytes, ''::bytea order by part) as whole from parts where n = 7`);
    expect(Number(back.rows[0].n)).toBe(parts);
    expect(parts).toBe(Math.ceil(file.length / partBytes));
    expect(Buffer.compare(back.rows[0].whole, file)).toBe(0);
  });
});
