// What must never get in, read by the same code the browser preview and the server import run.
import { describe, expect, it } from 'vitest';
import { readResults } from './read';
import { decodeText, notAResultsFile } from './csv';
import { FUTURE_ALLOWANCE_MINUTES, type IngestCatalogue } from './validate';

const catalogue: IngestCatalogue = {
  timeZone: 'Europe/London',
  lineCodes: new Set(['L1', 'L2']),
  productCodes: new Set(['P1', 'P2', 'PX']),
  // P1 is made on L1 only; PX has no line in the catalogue, so any line may make it.
  productLines: new Map([
    ['P1', new Set(['L1'])],
    ['P2', new Set(['L2'])],
  ]),
  characteristics: new Map([
    ['P1-FLOW', { productCode: 'P1', name: 'flow', unit: 'mm', subgroupSize: 2, physicalMin: 0, physicalMax: 400, physicalMaxExclusive: false }],
    ['PX-FLOW', { productCode: 'PX', name: 'flow', unit: 'mm', subgroupSize: 2, physicalMin: 0, physicalMax: 400, physicalMaxExclusive: false }],
  ]),
};

const header = 'lot,product,line,produced_at,characteristic,value,replicate,tested_at';
// A fixed "now" for the check: 1 December 2026, 12:00 UTC (the plant is on GMT then).
const now = Date.UTC(2026, 11, 1, 12);

function check(rows: string[]) {
  const reading = readResults(`${header}\n${rows.join('\n')}\n`, { catalogue, now });
  const valid = [...reading.batches].flat();
  return { valid, errors: reading.errors.map((e) => `${e.row} ${e.column}: ${e.message}`) };
}

describe('times that cannot be', () => {
  it('refuses a production or test time later than now, beyond the stated allowance for clocks that differ', () => {
    const { valid, errors } = check([
      'A,P1,L1,2027-03-01T06:00,P1-FLOW,146,1,',
      `B,P1,L1,2026-12-01T12:${String(FUTURE_ALLOWANCE_MINUTES - 1).padStart(2, '0')},P1-FLOW,146,1,`,
      `C,P1,L1,2026-12-01T06:00,P1-FLOW,146,1,2026-12-01T12:${String(FUTURE_ALLOWANCE_MINUTES + 1).padStart(2, '0')}`,
    ]);
    expect(errors).toEqual([
      `2 produced_at: Production time "2027-03-01T06:00" is later than now: a lot cannot have been made in the future (up to ${FUTURE_ALLOWANCE_MINUTES} minutes ahead are taken, for clocks that differ)`,
      `4 tested_at: Test time "2026-12-01T12:${FUTURE_ALLOWANCE_MINUTES + 1}" is later than now: a sample cannot have been tested in the future (up to ${FUTURE_ALLOWANCE_MINUTES} minutes ahead are taken, for clocks that differ)`,
    ]);
    // Within the allowance: a clock a few minutes fast is no reason to refuse a row.
    expect(valid.map((v) => v.lot)).toEqual(['B']);
  });

  it('refuses a test time before the production time', () => {
    expect(check(['A,P1,L1,2026-11-30T06:00,P1-FLOW,146,1,2026-11-29T06:00']).errors).toEqual(['2 tested_at: Test time is before the lot was produced']);
  });
});

describe('product and line', () => {
  it('refuses a product on a line the catalogue does not make it on, and names the lines that do', () => {
    const { valid, errors } = check(['A,P1,L2,2026-11-30T06:00,P1-FLOW,146,1,', 'B,P1,L1,2026-11-30T06:00,P1-FLOW,146,1,', 'C,PX,L2,2026-11-30T06:00,PX-FLOW,146,1,']);
    expect(errors).toEqual(['2 line: Product P1 is not made on line L2 (P1 is made on L1)']);
    expect(valid.map((v) => v.lot)).toEqual(['B', 'C']);
  });
});

describe('files that are not results files', () => {
  const bytes = (...b: number[]) => new Uint8Array(b);

  it('names binary content, a missing delimiter and a missing header, and reads no row of them', () => {
    // A ZIP archive (an .xlsx workbook is one) starts "PK\x03\x04" (PKWARE APPNOTE, local file header) and holds NUL bytes.
    const zip = decodeText(bytes(0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x06, 0x00, 0x08, 0x00, 0x00, 0x00, 0x21, 0x00, 0x62, 0xee, 0x9d, 0x68));
    expect(notAResultsFile(zip)).toMatch(/^This is not a results file: it holds binary content/);
    expect(notAResultsFile('Dear colleagues\nthe press is serviced on Monday\n')).toMatch(/^This is not a results file: no delimiter was found/);
    expect(notAResultsFile('A1,P1,L1,2026-11-30T06:00,P1-FLOW,146\nA1,P1,L1,2026-11-30T06:00,P1-FLOW,147\n')).toMatch(/^This is not a results file: it has no header/);
    expect(notAResultsFile(`${header}\nA,P1,L1,2026-11-30T06:00,P1-FLOW,146,1,\n`)).toBeNull();
    // A header the template does not use is still a header: the mapping step takes it.
    expect(notAResultsFile('Batch;Made;Flow 1;Flow 2\nA;30.11.2026 06:00;146;147\n')).toBeNull();

    const reading = readResults(zip, { catalogue, now });
    expect([...reading.batches].flat()).toEqual([]);
    expect(reading.errors).toEqual([{ row: 1, column: '', message: expect.stringMatching(/^This is not a results file: it holds binary content/) }]);
    expect(reading.rowsTotal).toBe(0);
  });

  it('reads a UTF-16 export with its byte order mark as text, not as binary content', () => {
    // Unicode text as some spreadsheets save it: UTF-16LE with the mark FF FE (Unicode Standard, ch. 23.8).
    const text = `\uFEFF${header}\r\n`;
    const utf16 = new Uint8Array(text.length * 2);
    for (let i = 0; i < text.length; i++) {
      utf16[2 * i] = text.charCodeAt(i) & 0xff;
      utf16[2 * i + 1] = text.charCodeAt(i) >> 8;
    }
    const decoded = decodeText(utf16);
    expect(decoded.startsWith('lot,product')).toBe(true);
    expect(notAResultsFile(decoded)).toBeNull();
  });
});
