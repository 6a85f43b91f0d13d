import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { and, eq, isNull, sql } from 'drizzle-orm';
import { createTestApi } from '@tests/support/api';
import { FILE_PART_BYTES } from '@api/files/store';
import { isDemoCode } from '@tests/support/catalogue';
import { auditEvents, lots, measurements, uploads } from '@api/db/schema';
import type { Role } from '@shared/schemas/users';

const api = createTestApi();
afterAll(() => api.close());

const as = async (role: Role) => ({ authorization: `Bearer ${await api.tokenFor(role)}` });
const run = `${Date.now() % 1_000_000}`;
let lotCounter = 0;
const newLot = () => `T${run}-${++lotCounter}`;
const header = 'lot,product,line,produced_at,characteristic,value,shift,replicate,tested_at,operator,note';

function upload(role: Role, body: string | Buffer, name = 'shift.csv', mapping?: unknown) {
  return as(role).then((h) => {
    const r = request(api.app).post('/api/v1/uploads').set(h).attach('file', Buffer.isBuffer(body) ? body : Buffer.from(body), name);
    return mapping ? r.field('mapping', JSON.stringify(mapping)) : r;
  });
}

const liveCount = async () => (await api.db.select({ n: sql<number>`count(*)::int` }).from(measurements).where(isNull(measurements.voidedAt)))[0].n;

describe('catalogue', () => {
  it('lists the demo products and characteristics, each with a code and the specification in force', async () => {
    const h = await as('auditor');
    const products = await request(api.app).get('/api/v1/products').set(h);
    expect(products.status).toBe(200);
    expect(products.body.items.map((p: { code: string }) => p.code).filter(isDemoCode).sort()).toEqual(['HVFX', 'HVL25', 'HVLF', 'HVR3']);
    const chars = await request(api.app).get('/api/v1/characteristics').set(h);
    const flow = chars.body.items.find((c: { code: string }) => c.code === 'HVL25-FLOW');
    expect(flow).toMatchObject({ productCode: 'HVL25', unit: 'mm', subgroupSize: 2, chartType: 'xbar-r', spec: { lsl: 135, usl: 155, target: 145, revision: 1 } });
  });

  it('holds six months of demo history, imported through the upload path', async () => {
    const [history] = await api.db.select().from(uploads).where(eq(uploads.fileName, 'harrow-vale-history.csv'));
    expect(history.status).toBe('imported');
    expect(history.rowsImported).toBeGreaterThan(20_000);
    const [{ n }] = await api.db.select({ n: sql<number>`count(*)::int` }).from(lots);
    expect(n).toBeGreaterThan(1000);
  });

  it('shows every test method with its standard and the handling cautions', async () => {
    const res = await request(api.app).get('/api/v1/test-methods').set(await as('technician'));
    const rc = res.body.items.find((m: { code: string }) => m.code === 'RC');
    expect(rc.standard).toMatch(/EN 196-1|EN 13892-2/);
    expect(rc.cautions.join(' ')).toMatch(/safety data sheet/i);
  });
});

describe('POST /api/v1/uploads', () => {
  it('imports a valid long-format file (201) and stores every row against its lot', async () => {
    const lot = newLot();
    const csv = `${header}\n${lot},HVL25,L1,2026-11-02T06:30:00Z,HVL25-FLOW,146,early,1,2026-11-02T07:00:00Z,AT,\n${lot},HVL25,L1,2026-11-02T06:30:00Z,HVL25-FLOW,147,early,2,2026-11-02T07:00:00Z,AT,second ring\n`;
    const before = await liveCount();
    const res = await upload('technician', csv);
    expect(res.status).toBe(201);
    expect(res.body).toEqual({ id: expect.any(Number), rowsImported: 2 });
    expect(await liveCount()).toBe(before + 2);
    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    expect(detail.body.results.map((r: { value: number }) => r.value)).toEqual([146, 147]);
    expect(detail.body.producedAt).toBe('2026-11-02T06:30:00.000Z');
  });

  it('refuses the same bytes a second time (409) and stores nothing twice', async () => {
    const lot = newLot();
    const csv = `${header}\n${lot},HVL25,L1,2026-11-03T06:30:00Z,HVL25-AIR,3.1,early,1,,,\n`;
    const first = await upload('technician', csv);
    expect(first.status).toBe(201);
    const before = await liveCount();
    const again = await upload('quality_manager', csv, 'renamed.csv');
    expect(again.status).toBe(409);
    // When, on the plant's clock and in its date format (the demo plant: dd/MM/yyyy).
    expect(again.body.error).toMatch(/^This file was already imported as upload \d+ on \d{2}\/\d{2}\/\d{4} \d{2}:\d{2} \(plant time\)$/);
    // The one error shape, with the earlier upload named for the page's link.
    expect(again.body).toEqual({ error: expect.any(String), uploadId: first.body.id });
    expect(await liveCount()).toBe(before);
  });

  it('imports nothing when one row among good ones is bad (422 naming row and column)', async () => {
    const lot = newLot();
    const rows = Array.from({ length: 5 }, (_, i) => `${lot}-${i},HVL25,L1,2026-11-04T06:30:00Z,HVL25-DENS,${1950 + i},early,1,,,`);
    rows.splice(3, 0, `${lot}-x,HVL25,L1,2026-11-04T06:30:00Z,HVL25-DENS,heavy,early,1,,,`);
    const before = await liveCount();
    const res = await upload('technician', `${header}\n${rows.join('\n')}\n`);
    expect(res.status).toBe(422);
    expect(Object.keys(res.body).sort()).toEqual(['details', 'error', 'uploadId']);
    expect(res.body.details).toEqual([{ path: 'row 5 › value', row: 5, column: 'value', message: expect.stringMatching(/"heavy" is not a number/) }]);
    expect(await liveCount()).toBe(before);
    const stored = await api.db.select().from(lots).where(eq(lots.lotNumber, `${lot}-0`));
    expect(stored).toHaveLength(0);

    const report = await request(api.app).get(`/api/v1/uploads/${res.body.uploadId}/errors.csv`).set(await as('technician'));
    // Every CSV the product writes starts with the UTF-8 byte-order mark (shared/csv.ts).
    expect(report.text.split('\r\n')[0]).toBe('\ufeffrow,column,message');
    expect(report.text).toMatch(/^5,value,/m);
    const history = await request(api.app).get('/api/v1/uploads?status=rejected').set(await as('auditor'));
    expect(history.body.items.find((u: { id: number }) => u.id === res.body.uploadId)).toMatchObject({ status: 'rejected', rowsTotal: 6, rowsRejected: 1, rowsImported: 0 });
  });

  it('reads European exports: ";" delimiter, decimal comma and dd.mm.yyyy HH:MM in plant time', async () => {
    const lot = newLot();
    const csv = `lot;product;line;produced_at;characteristic;value;replicate\n${lot};HVL25;L1;15.07.2026 08:00;HVL25-RF28;7,45;1\n${lot};HVL25;L1;15.07.2026 08:00;HVL25-RF28;7,6;2\n${lot}-w;HVL25;L1;15.01.2026 08:00;HVL25-AIR;2,95;1\n`;
    const res = await upload('technician', csv, 'press-export.csv');
    expect(res.status).toBe(201);
    const summer = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    expect(summer.body.results.map((r: { value: number }) => r.value)).toEqual([7.45, 7.6]);
    // Europe/London is UTC+1 in July and UTC+0 in January (IANA time zone database; UK summer time rules).
    expect(summer.body.producedAt).toBe('2026-07-15T07:00:00.000Z');
    const winter = await request(api.app).get(`/api/v1/lots/${lot}-w`).set(await as('auditor'));
    expect(winter.body.producedAt).toBe('2026-01-15T08:00:00.000Z');
  });

  it('keeps each value with its own characteristic and replicate when the rows of a lot interleave characteristics', async () => {
    // The import writes a round's rows grouped by characteristic, not in file order.
    const lot = newLot();
    const at = '2026-11-07T06:30:00Z';
    const rows = [
      ['HVL25-FLOW', 146, 1],
      ['HVL25-AIR', 3.1, 1],
      ['HVL25-FLOW', 148, 2],
      ['HVL25-DENS', 1952, 1],
      ['HVL25-FLOW30', 139, 2],
      ['HVL25-FLOW30', 138, 1],
    ] as const;
    const csv = `${header}\n${rows.map(([code, value, replicate]) => `${lot},HVL25,L1,${at},${code},${value},early,${replicate},,,`).join('\n')}\n`;
    expect((await upload('technician', csv)).status).toBe(201);
    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    const stored = detail.body.results.map((r: { characteristicCode: string; replicate: number; value: number }) => `${r.characteristicCode}#${r.replicate}=${r.value}`);
    expect([...stored].sort()).toEqual(rows.map(([code, value, replicate]) => `${code}#${replicate}=${value}`).sort());
  });

  it('reads the file with the delimiter and decimal mark chosen in the preview, over what it would detect', async () => {
    const lot = newLot();
    const csv = Buffer.from(`${header.replaceAll(',', ';')}\n${lot};HVL25;L1;2026-11-11T06:00:00Z;HVL25-AIR;3,2;;1;;;\n`);
    const send = async (fields: Record<string, string>) => {
      const r = request(api.app).post('/api/v1/uploads').set(await as('technician')).attach('file', csv, 'chosen-dialect.csv');
      for (const [name, value] of Object.entries(fields)) r.field(name, value);
      return r;
    };
    // Detection alone would read "3,2" as 3.2; told the decimal mark is a point, the cell is no number.
    const point = await send({ decimalComma: 'false' });
    expect(point.status).toBe(422);
    expect(point.body.details).toEqual([{ path: 'row 2 › value', row: 2, column: 'value', message: '"3,2" is not a number (this file uses "." as the decimal mark)' }]);
    // Told the delimiter is a comma, the header is one long column and the canonical ones are missing.
    const comma = await send({ delimiter: ',' });
    expect(comma.status).toBe(422);
    expect(comma.body.details[0]).toMatchObject({ row: 1, message: 'Missing columns: lot, product, line, produced_at, characteristic, value' });
    expect((await send({ delimiter: '|' })).status).toBe(400);
    expect(await api.db.select().from(lots).where(eq(lots.lotNumber, lot))).toHaveLength(0);

    const confirmed = await send({ delimiter: ';', decimalComma: 'true' });
    expect(confirmed.status).toBe(201);
    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    expect(detail.body.results.map((r: { value: number }) => r.value)).toEqual([3.2]);
  });

  it('gives a precise message for each kind of bad row and keeps formula-looking cells as plain data', async () => {
    const lot = newLot();
    const csv = [
      header,
      `${lot}-a,NOPE,L1,2026-11-05T06:00:00Z,HVL25-FLOW,146,,1,,,`,
      `${lot}-b,HVL25,L1,2026-11-05T06:00:00Z,HVL25-XYZ,146,,1,,,`,
      `${lot}-c,HVL25,L1,31.02.2026 06:00,HVL25-FLOW,146,,1,,,`,
      `${lot}-d,HVL25,L1,2026-11-05T06:00:00Z,HVL25-RC28,-3,,1,,,`,
      `${lot}-e,HVL25,L1,2026-11-05T06:00:00Z,HVL25-AIR,104,,1,,,`,
      `${lot}-f,HVL25,L1,2026-11-05T06:00:00Z,HVL25-FLOW,=1+1,,1,,,`,
      `${lot}-g,HVL25,L1,2026-11-05T06:00:00Z,HVL25-FLOW,146,,3,,,`,
      `${lot}-h,HVL25,L1,2026-11-05T06:00:00Z,HVFX-SLIP,0.2,,1,,,`,
      `${lot}-i,HVL25,L1,2026-11-05T06:00:00Z,HVL25-FLOW,146,,1,,,`,
      `${lot}-i,HVL25,L1,2026-11-05T06:00:00Z,HVL25-FLOW,147,,1,,,`,
      `${lot}-j,HVL25,L1,2026-11-05T06:00:00Z,HVL25-FLOW,146,,1,2026-11-04T06:00:00Z,,`,
      `${lot}-k,HVL25,L9,2026-11-05T06:00:00Z,HVL25-FLOW,146,,1,,,`,
    ].join('\n');
    const res = await upload('technician', csv);
    expect(res.status).toBe(422);
    const byRow = Object.fromEntries(res.body.details.map((e: { row: number; column: string; message: string }) => [e.row, `${e.column}: ${e.message}`]));
    // The messages name what the cell may hold, so the technician can correct it without asking.
    expect(byRow[2]).toMatch(/^product: Unknown product code "NOPE" \(products: .*\bHVL25\b.*\)$/);
    expect(byRow[3]).toMatch(/^characteristic: Unknown characteristic code "HVL25-XYZ" \(HVL25 has: .*\bHVL25-FLOW\b.*\)$/);
    // 31 February: written as a date, but no such day.
    expect(byRow[4]).toBe('produced_at: "31.02.2026 06:00" is not a day and time of the calendar: check the day, month and hour');
    expect(byRow[5]).toMatch(/^value: -3 MPa is not a possible/);
    expect(byRow[6]).toMatch(/^value: 104 % is not a possible/);
    expect(byRow[7]).toMatch(/^value: "=1\+1" is not a number/);
    expect(byRow[8]).toMatch(/^replicate: HVL25-FLOW takes 2 replicates per lot/);
    expect(byRow[9]).toMatch(/^characteristic: Characteristic HVFX-SLIP belongs to product HVFX/);
    expect(byRow[11]).toMatch(/^replicate: Duplicate: row 10 already gives/);
    expect(byRow[12]).toMatch(/^tested_at: Test time is before the lot was produced/);
    expect(byRow[13]).toMatch(/^line: Unknown production line "L9" \(lines: .*\bL1\b.*\)$/);
    const report = await request(api.app).get(`/api/v1/uploads/${res.body.uploadId}/errors.csv`).set(await as('technician'));
    expect(report.status).toBe(200);
    expect(report.text).not.toMatch(/(^|,)=1\+1/m);
  });

  it('refuses a result from the future and a product on a line that does not make it, and stores nothing', async () => {
    const lot = newLot();
    // Three months ahead: far beyond the minutes allowed for a lab clock that runs fast.
    const ahead = new Date(Date.now() + 90 * 86_400_000).toISOString().slice(0, 16);
    const csv = [
      header,
      `${lot}-a,HVL25,L1,${ahead},HVL25-FLOW,146,,1,,,`,
      `${lot}-b,HVL25,L1,2026-11-05T06:00:00Z,HVL25-FLOW,146,,1,${ahead},,`,
      // HV Level 25 is made on line L1 (the demo catalogue, api/db/seed/scenario/plant.ts), not on L2.
      `${lot}-c,HVL25,L2,2026-11-05T06:00:00Z,HVL25-FLOW,146,,1,,,`,
      `${lot}-d,HVL25,L1,2026-11-05T06:00:00Z,HVL25-FLOW,146,,1,,,`,
    ].join('\n');
    const before = await liveCount();
    const res = await upload('technician', csv);
    expect(res.status).toBe(422);
    expect(res.body.details.map((e: { row: number; column: string; message: string }) => [e.row, e.column, e.message])).toEqual([
      [2, 'produced_at', expect.stringMatching(/^Production time ".*" is later than now: a lot cannot have been made in the future \(up to 15 minutes ahead/)],
      [3, 'tested_at', expect.stringMatching(/^Test time ".*" is later than now/)],
      [4, 'line', 'Product HVL25 is not made on line L2 (HVL25 is made on L1)'],
    ]);
    expect(await liveCount()).toBe(before);
    expect(await api.db.select().from(lots).where(eq(lots.lotNumber, `${lot}-a`))).toHaveLength(0);
  });

  it('says plainly that a binary or unrelated file is not a results file, and why', async () => {
    // The signature every PNG picture starts with (ISO/IEC 15948, 5.2), then its header chunk's length.
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0x00, 0x00, 0x00, 0x0d, 0x49, 0x48, 0x44, 0x52, 0x00, 0x00, 0x01, 0x00]);
    const picture = await upload('technician', png, 'photo.csv');
    expect(picture.status).toBe(422);
    expect(picture.body.details).toEqual([{ path: 'row 1', row: 1, column: '', message: expect.stringMatching(/^This is not a results file: it holds binary content/) }]);
    const letter = await upload('technician', 'Dear colleagues\nThe press is serviced on Monday\n', 'notice.csv');
    expect(letter.body.details[0].message).toMatch(/^This is not a results file: no delimiter was found/);
    const headless = await upload('technician', `${newLot()},HVL25,L1,2026-11-05T06:00:00Z,HVL25-FLOW,146\n${newLot()},HVL25,L1,2026-11-05T06:00:00Z,HVL25-FLOW,147\n`, 'no-header.csv');
    expect(headless.body.details[0].message).toMatch(/^This is not a results file: it has no header/);
  });

  it('stores a formula-looking note verbatim as text', async () => {
    const lot = newLot();
    const res = await upload('technician', `${header}\n${lot},HVL25,L1,2026-11-05T06:00:00Z,HVL25-AIR,3.2,,1,,AT,"=HYPERLINK(""x"")"\n`);
    expect(res.status).toBe(201);
    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    expect(detail.body.results[0].note).toBe('=HYPERLINK("x")');
  });

  it('refuses a measurement that is already stored (same lot, characteristic, replicate) instead of overwriting it', async () => {
    const lot = newLot();
    expect((await upload('technician', `${header}\n${lot},HVL25,L1,2026-11-06T06:00:00Z,HVL25-AIR,3.0,,1,,,\n`)).status).toBe(201);
    const res = await upload('technician', `${header}\n${lot},HVL25,L1,2026-11-06T06:00:00Z,HVL25-AIR,3.9,,1,,,corrected\n`);
    expect(res.status).toBe(422);
    expect(res.body.details[0]).toMatchObject({ row: 2, column: 'replicate', message: expect.stringMatching(/already stored/) });
    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    expect(detail.body.results.map((r: { value: number }) => r.value)).toEqual([3.0]);
  });

  it('stores a file of many pieces whole or not at all: a bad row in the last piece leaves nothing, the fixed file every row', async () => {
    // 24,000 rows (about 2.3 MB) are read in several 1 MB pieces; pieces before the bad one have gone to the database by then.
    const base = newLot();
    const rows: string[] = [];
    for (let i = 0; i < 12_000; i++) {
      const produced = new Date(Date.UTC(2025, 0, 1, 6) + i * 600_000).toISOString();
      for (let r = 1; r <= 2; r++) rows.push(`${base}-${i},HVL25,L1,${produced},HVL25-FLOW,${140 + ((i + r) % 9)},early,${r},${produced},AT,`);
    }
    const bad = [...rows];
    bad[23_990] = bad[23_990].replace(/,1\d\d,early,/, ',abc,early,');
    const before = await liveCount();
    const refused = await upload('technician', `${header}\n${bad.join('\n')}\n`, 'many-pieces.csv');
    expect(refused.status).toBe(422);
    expect(refused.body.details).toEqual([{ path: 'row 23992 › value', row: 23_992, column: 'value', message: '"abc" is not a number (this file uses "." as the decimal mark)' }]);
    expect(await liveCount()).toBe(before);
    const [{ n: lotsAfterRefusal }] = await api.db.select({ n: sql<number>`count(*)::int` }).from(lots).where(sql`${lots.lotNumber} like ${`${base}-%`}`);
    expect(lotsAfterRefusal).toBe(0);

    const res = await upload('technician', `${header}\n${rows.join('\n')}\n`, 'many-pieces.csv');
    expect(res.status).toBe(201);
    expect(res.body.rowsImported).toBe(24_000);
    const [{ n: stored }] = await api.db.select({ n: sql<number>`count(*)::int` }).from(measurements).where(eq(measurements.uploadId, res.body.id));
    expect(stored).toBe(24_000);
    const [{ n: lotCount }] = await api.db.select({ n: sql<number>`count(*)::int` }).from(lots).where(sql`${lots.lotNumber} like ${`${base}-%`}`);
    expect(lotCount).toBe(12_000);
    const [last] = await api.db.select({ value: measurements.value }).from(measurements).innerJoin(lots, eq(lots.id, measurements.lotId)).where(and(eq(lots.lotNumber, `${base}-11999`), eq(measurements.replicate, 2)));
    expect(last.value).toBe(140 + ((11_999 + 2) % 9));
  });

  it('names a stored duplicate found in a later piece of a large file', async () => {
    const lot = newLot();
    const first = await upload('technician', `${header}\n${lot},HVL25,L1,2025-06-01T06:00:00Z,HVL25-FLOW,146,early,1,2025-06-01T07:00:00Z,AT,\n`);
    expect(first.status).toBe(201);
    const rows: string[] = [];
    for (let i = 0; i < 15_000; i++) rows.push(`${lot}-N${i},HVL25,L1,2025-06-02T06:00:00Z,HVL25-FLOW,146,early,1,,AT,`);
    rows.push(`${lot},HVL25,L1,2025-06-01T06:00:00Z,HVL25-FLOW,150,early,1,,AT,`);
    const before = await liveCount();
    const res = await upload('technician', `${header}\n${rows.join('\n')}\n`);
    expect(res.status).toBe(422);
    expect(res.body.details).toEqual([{ path: 'row 15002 › replicate', row: 15_002, column: 'replicate', message: expect.stringMatching(/^Duplicate: HVL25-FLOW replicate 1 of lot .* is already stored/) }]);
    expect(await liveCount()).toBe(before);
  });

  it('names missing columns and empty files', async () => {
    const missing = await upload('technician', 'lot,product,value\nA,HVL25,1\n');
    expect(missing.status).toBe(422);
    expect(missing.body.details[0]).toMatchObject({ row: 1, message: 'Missing columns: line, produced_at, characteristic' });
    const empty = await upload('technician', '');
    expect(empty.status).toBe(422);
    expect(empty.body.details[0].message).toMatch(/empty/);
  });

  it('imports a wide file (one row per lot) through a column mapping', async () => {
    const lot = newLot();
    const csv = `Batch;Product;Line;Made;Flow A;Flow B;Air\n${lot};HVL25;L1;2026-11-07 06:10;145;147;3,1\n`;
    const mapping = {
      format: 'wide',
      columns: { lot: 'Batch', product: 'Product', line: 'Line', produced_at: 'Made' },
      characteristicColumns: { 'Flow A': 'HVL25-FLOW', 'Flow B': 'HVL25-FLOW', Air: 'HVL25-AIR' },
    };
    const res = await upload('technician', csv, 'wide.csv', mapping);
    expect(res.status).toBe(201);
    expect(res.body.rowsImported).toBe(3);
    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    expect(detail.body.results.map((r: { characteristicCode: string; replicate: number; value: number }) => [r.characteristicCode, r.replicate, r.value])).toEqual([
      ['HVL25-FLOW', 1, 145],
      ['HVL25-FLOW', 2, 147],
      ['HVL25-AIR', 1, 3.1],
    ]);
  });

  it('keeps the original bytes of an imported and of a rejected file and gives them back unchanged', async () => {
    // A Windows export: UTF-8 byte order mark, CRLF line ends, a degree sign; over a megabyte, so it is kept
    // in two parts of stored_file_parts (FILE_PART_BYTES), each packed by PostgreSQL (LZ4 where the server
    // has it, migration 0010).
    const lot = newLot();
    const remark = 'Lab at 21 °C, mixer paddle checked, flow table wiped dry before each reading, tamping by hand as usual';
    const rows = Array.from({ length: 9000 }, (_, i) => `${lot}-${i},HVL25,L1,2026-11-05T06:30:00Z,HVL25-DENS,${1940 + (i % 40)},early,1,,AT,"${remark}"`);
    const good = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(`${header}\r\n${rows.join('\r\n')}\r\n`, 'utf8')]);
    const bad = Buffer.from(`${header}\r\n${rows[0].replace('1940', 'heavy')}\r\n`, 'utf8');
    const imported = await upload('technician', good, 'density-export.csv');
    expect(imported.status).toBe(201);
    const rejected = await upload('technician', bad, 'density-export-bad.csv');
    expect(rejected.status).toBe(422);

    for (const [id, bytes] of [
      [imported.body.id, good],
      [rejected.body.uploadId, bad],
    ] as const) {
      const file = await request(api.app).get(`/api/v1/uploads/${id}/file`).set(await as('auditor')).buffer(true)
        .parse((res, done) => {
          const chunks: Buffer[] = [];
          res.on('data', (c: Buffer) => chunks.push(c));
          res.on('end', () => done(null, Buffer.concat(chunks)));
        });
      expect(file.status).toBe(200);
      expect(Buffer.compare(file.body as Buffer, bytes)).toBe(0);
      // The fingerprint that refuses a second import, against Node's own SHA-256 (OpenSSL).
      const [row] = await api.db.select({ sha256: uploads.sha256 }).from(uploads).where(eq(uploads.id, id));
      expect(row.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    }
    expect(good.length).toBeGreaterThan(FILE_PART_BYTES);
    const stored = await api.db.execute<{ part: number; size: number; how: string | null; lz4: boolean }>(sql`
      select part, length(bytes) as size, pg_column_compression(bytes) as how,
             exists (select 1 from pg_settings where name = 'default_toast_compression' and 'lz4' = any(enumvals)) as lz4
      from stored_file_parts where file_id = (select file_id from uploads where id = ${imported.body.id}) order by part`);
    expect(stored.rows.map((r) => [r.part, r.size])).toEqual([
      [0, FILE_PART_BYTES],
      [1, good.length - FILE_PART_BYTES],
    ]);
    for (const r of stored.rows) expect(r.how).toBe(r.lz4 ? 'lz4' : null);
    const listed = await request(api.app).get('/api/v1/uploads').set(await as('auditor'));
    expect(listed.body.items.find((u: { id: number }) => u.id === imported.body.id).sizeBytes).toBe(good.length);
  });

  it('refuses to hand out a kept file whose bytes no longer match its fingerprint', async () => {
    const csv = `${header}\n${newLot()},HVL25,L1,2026-11-05T06:30:00Z,HVL25-DENS,1950,early,1,,AT,\n`;
    const imported = await upload('technician', csv, 'tampered.csv');
    expect(imported.status).toBe(201);
    await api.db.execute(sql`update stored_file_parts set bytes = overlay(bytes placing '\x39'::bytea from 60 for 1) where file_id = (select file_id from uploads where id = ${imported.body.id})`);
    const res = await request(api.app).get(`/api/v1/uploads/${imported.body.id}/file`).set(await as('auditor'));
    expect(res.status).toBe(500);
    expect(res.body.error).toMatch(/no longer matches .* SHA-256/);
  });

  it('answers 413 for a file over 20 MB and 403 for auditors', async () => {
    const big = Buffer.alloc(20 * 1024 * 1024 + 1, 'a');
    expect((await upload('technician', big, 'huge.csv')).status).toBe(413);
    const forbidden = await upload('auditor', `${header}\n`);
    expect(forbidden.status).toBe(403);
  });
});

describe('POST /api/v1/uploads/:id/void', () => {
  it('takes the upload out of every calculation but keeps its rows for the record', async () => {
    const lot = newLot();
    const csv = `${header}\n${lot},HVL25,L1,2026-11-08T06:00:00Z,HVL25-AIR,9.9,,1,,,wrong mix water\n`;
    const imported = await upload('technician', csv);
    expect(imported.status).toBe(201);
    expect((await request(api.app).post(`/api/v1/uploads/${imported.body.id}/void`).set(await as('technician')).send({ reason: 'wrong file' })).status).toBe(403);
    expect((await request(api.app).post(`/api/v1/uploads/${imported.body.id}/void`).set(await as('quality_manager')).send({})).status).toBe(400);
    const voided = await request(api.app).post(`/api/v1/uploads/${imported.body.id}/void`).set(await as('quality_manager')).send({ reason: 'Samples mixed with the wrong water dose' });
    expect(voided.status).toBe(200);
    expect(voided.body).toMatchObject({ status: 'voided', measurementsVoided: 1 });

    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    expect(detail.body.results).toEqual([]);
    const kept = await api.db.select().from(measurements).where(eq(measurements.uploadId, imported.body.id));
    expect(kept).toHaveLength(1);
    expect(kept[0].voidedAt).not.toBeNull();
    const trail = await api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'upload'), eq(auditEvents.entityId, String(imported.body.id)), eq(auditEvents.action, 'void')));
    expect(trail[0].reason).toBe('Samples mixed with the wrong water dose');

    expect((await request(api.app).post(`/api/v1/uploads/${imported.body.id}/void`).set(await as('quality_manager')).send({ reason: 'again please' })).status).toBe(409);
    const retest = await upload('technician', `${header}\n${lot},HVL25,L1,2026-11-08T06:00:00Z,HVL25-AIR,3.3,,1,,,retest\n`);
    expect(retest.status).toBe(201);
  });
});

describe('manual entry and corrections', () => {
  it('turns raw breaking loads into strengths by the EN 196-1 formulas before storing', async () => {
    const lot = newLot();
    const res = await request(api.app)
      .post('/api/v1/measurements')
      .set(await as('technician'))
      .send({
        lot,
        product: 'HVL25',
        line: 'L1',
        producedAt: '2026-11-09T06:20',
        shift: 'early',
        operator: 'AT',
        results: [
          // EN 196-1: Rc = Fc / 1600 mm² → 40 kN gives 25.0 MPa, 48 kN gives 30.0 MPa.
          { characteristic: 'HVL25-RC28', entryUnit: 'kN', replicates: [40, 48, 44, 44, 46, 46] },
          // EN 196-1: Rf = 1.5 · Ff · l / b³ = 1.5 · 3200 N · 100 mm / 40³ mm³ = 7.5 MPa.
          { characteristic: 'HVL25-RF28', entryUnit: 'N', replicates: [3200, 3200, 3200] },
        ],
      });
    expect(res.status).toBe(201);
    expect(res.body.rowsImported).toBe(9);
    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    const values = (code: string) => detail.body.results.filter((r: { characteristicCode: string }) => r.characteristicCode === code).map((r: { value: number }) => r.value);
    expect(values('HVL25-RC28')).toEqual([25, 30, 27.5, 27.5, 28.75, 28.75]);
    expect(values('HVL25-RF28')).toEqual([7.5, 7.5, 7.5]);
  });

  it('names a future or out-of-order time and a product on the wrong line under the form fields, and stores nothing', async () => {
    const lot = newLot();
    const entry = (over: Record<string, unknown>, testedAt?: string) => ({
      lot,
      product: 'HVL25',
      line: 'L1',
      producedAt: '2026-11-09T06:20',
      results: [{ characteristic: 'HVL25-FLOW', replicates: [146, 147], ...(testedAt ? { testedAt } : {}) }],
      ...over,
    });
    const send = async (body: object) => request(api.app).post('/api/v1/measurements').set(await as('technician')).send(body);
    const ahead = new Date(Date.now() + 30 * 86_400_000).toISOString();

    const future = await send(entry({ producedAt: ahead }));
    expect(future.status).toBe(422);
    expect(future.body.details).toEqual([{ path: 'producedAt', message: expect.stringMatching(/is later than now: a lot cannot have been made in the future/) }]);
    const early = await send(entry({}, '2026-11-08T06:20'));
    expect(early.body.details).toEqual([{ path: 'results.0.testedAt', message: 'Test time is before the lot was produced' }]);
    const line = await send(entry({ line: 'L2' }));
    expect(line.body.details).toEqual([{ path: 'line', message: 'Product HVL25 is not made on line L2 (HVL25 is made on L1)' }]);
    expect(line.body.error).toMatch(/^Nothing was saved/);
    expect(await api.db.select().from(lots).where(eq(lots.lotNumber, lot))).toHaveLength(0);
    expect((await send(entry({}))).status).toBe(201);
  });

  it('corrects a stored value only with a reason, and the audit trail keeps before and after', async () => {
    const lot = newLot();
    await upload('technician', `${header}\n${lot},HVL25,L1,2026-11-10T06:00:00Z,HVL25-DENS,1590,,1,,,\n`);
    const detail = await request(api.app).get(`/api/v1/lots/${lot}`).set(await as('auditor'));
    const id = detail.body.results[0].id;
    expect((await request(api.app).patch(`/api/v1/measurements/${id}`).set(await as('technician')).send({ value: 1950 })).status).toBe(400);
    const fixed = await request(api.app).patch(`/api/v1/measurements/${id}`).set(await as('technician')).send({ value: 1950, reason: 'Digits swapped when typing' });
    expect(fixed.status).toBe(200);
    expect(fixed.body.value).toBe(1950);
    const [entry] = await api.db.select().from(auditEvents).where(and(eq(auditEvents.entity, 'measurement'), eq(auditEvents.entityId, String(id))));
    expect(entry).toMatchObject({ action: 'correct', before: { value: 1590 }, after: { value: 1950 }, reason: 'Digits swapped when typing' });
    expect((await request(api.app).patch(`/api/v1/measurements/${id}`).set(await as('auditor')).send({ value: 1, reason: 'auditor try' })).status).toBe(403);
  });
});

// A refused file is kept as evidence, so keeping it is a change the audit trail records, in the same
// transaction as the kept upload (21 CFR 11.10(e): audit trails of actions that create electronic records).
describe('the audit event of a rejected upload', () => {
  it('records who sent the refused file, its name and counts, committed with the rejected upload itself', async () => {
    const lot = newLot();
    const rows = [
      `${lot}-1,HVL25,L1,2026-11-05T06:30:00Z,HVL25-DENS,1950,early,1,,,`,
      `${lot}-2,HVL25,L1,2026-11-05T06:30:00Z,HVL25-DENS,dense,early,1,,,`,
      `${lot}-3,HVL25,L1,2026-11-05T06:30:00Z,HVL25-DENS,1951,early,1,,,`,
      `${lot}-4,HVL25,L1,2026-11-05T06:30:00Z,NO-SUCH-CHAR,1952,early,1,,,`,
    ];
    const res = await upload('technician', `${header}\n${rows.join('\n')}\n`, 'night-shift-refused.csv');
    expect(res.status).toBe(422);
    const technician = (await api.db.execute<{ id: number }>(sql`select id from users where email = 'technician@harrowvale.example'`)).rows[0].id;
    const trail = await api.db.execute<{ actor_id: number | null; action: string; after: unknown; seq: string | null; xmin: string }>(sql`
      select actor_id, action, after, seq, xmin::text as xmin from audit_events where entity = 'upload' and entity_id = ${String(res.body.uploadId)}`);
    expect(trail.rows).toEqual([
      { actor_id: technician, action: 'reject', after: { fileName: 'night-shift-refused.csv', rowsTotal: 4, rowsRejected: 2 }, seq: expect.any(String), xmin: expect.any(String) },
    ]);
    const kept = await api.db.execute<{ status: string; xmin: string }>(sql`select status, xmin::text as xmin from uploads where id = ${res.body.uploadId}`);
    expect(kept.rows[0]).toEqual({ status: 'rejected', xmin: trail.rows[0].xmin });
  });
});
