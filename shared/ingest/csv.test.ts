// Reading a file in pieces must give exactly the rows of reading it whole. The reference for "whole" is
// Papa Parse itself (npm papaparse) on the entire text, and Papa.unparse writes the test files, so
// quoting follows RFC 4180 as that library implements it.
import fc from 'fast-check';
import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { csvPieces, parseCsv, readCsv } from './csv';

const cell = fc.string({ unit: fc.constantFrom('a', 'B', '7', ',', ';', '"', '\n', '\r\n', ' ', '.', 'é'), maxLength: 8 });

describe('csvPieces', () => {
  it('cuts only at line ends outside quotes, and the pieces join back to the text', () => {
    fc.assert(
      fc.property(fc.array(fc.array(cell, { minLength: 3, maxLength: 3 }), { minLength: 1, maxLength: 30 }), fc.integer({ min: 1, max: 40 }), (table, size) => {
        const text = Papa.unparse([['a', 'b', 'c'], ...table], { newline: '\n' });
        const pieces = [...csvPieces(text, size)];
        expect(pieces.join('')).toBe(text);
        // Each piece parses on its own into the rows the whole text holds at that place.
        const whole = Papa.parse<string[]>(text, { header: false, delimiter: ',' }).data;
        const byPiece = pieces.flatMap((p) => Papa.parse<string[]>(p.endsWith('\n') ? p.slice(0, -1) : p, { header: false, delimiter: ',' }).data);
        expect(byPiece).toEqual(whole);
      }),
      { numRuns: 300 },
    );
  });
});

describe('readCsv', () => {
  it('gives the header and the same rows piece by piece as Papa Parse gives for the whole text', () => {
    fc.assert(
      fc.property(fc.array(fc.array(cell.filter((c) => c.trim() !== ''), { minLength: 4, maxLength: 4 }), { minLength: 1, maxLength: 60 }), fc.integer({ min: 8, max: 200 }), (table, size) => {
        const text = Papa.unparse([['lot', 'value', 'note', 'x'], ...table], { newline: '\r\n' });
        const reading = readCsv(text, { delimiter: ',' }, size);
        const rows = [...reading.pieces].flatMap((p) => p.rows);
        expect(reading.headers).toEqual(['lot', 'value', 'note', 'x']);
        expect(rows).toEqual(Papa.parse<string[]>(text, { header: false, skipEmptyLines: 'greedy' }).data.slice(1));
      }),
      { numRuns: 200 },
    );
  });

  it('splits files without quotes the way Papa Parse does, with LF or CRLF line ends', () => {
    const plainCell = fc.string({ unit: fc.constantFrom('a', 'B', '7', ' ', '.', 'é', ';', '-'), maxLength: 6 }).filter((c) => c.trim() !== '');
    fc.assert(
      fc.property(fc.array(fc.array(plainCell, { minLength: 3, maxLength: 3 }), { minLength: 1, maxLength: 40 }), fc.constantFrom('\n', '\r\n'), fc.integer({ min: 8, max: 120 }), (table, newline, size) => {
        const text = [['lot', 'value', 'note'], ...table].map((r) => r.join(',')).join(newline) + newline;
        const rows = [...readCsv(text, { delimiter: ',' }, size).pieces].flatMap((p) => p.rows);
        expect(rows).toEqual(Papa.parse<string[]>(text, { header: false, delimiter: ',', skipEmptyLines: 'greedy' }).data.slice(1));
      }),
      { numRuns: 200 },
    );
  });

  it('numbers rows as a spreadsheet does across pieces and names rows with too few or too many fields', () => {
    const lines = ['lot,value'];
    for (let i = 0; i < 50; i++) lines.push(i === 30 ? 'A30' : i === 41 ? 'A41,1,2' : `A${i},${i}`);
    const reading = readCsv(lines.join('\n'), {}, 64);
    const pieces = [...reading.pieces];
    expect(pieces.length).toBeGreaterThan(3);
    const numbered = pieces.flatMap((p) => p.rows.map((r, i) => [p.firstRow + i, r[0]]));
    expect(numbered[0]).toEqual([2, 'A0']);
    expect(numbered.at(-1)).toEqual([51, 'A49']);
    // Row 32 is data row 30 ("A30"), row 43 is "A41,1,2"; the messages are Papa Parse's own for a header parse.
    expect(pieces.flatMap((p) => p.errors)).toEqual([
      { row: 32, column: '', message: 'The file cannot be read here: Too few fields: expected 2 fields but parsed 1' },
      { row: 43, column: '', message: 'The file cannot be read here: Too many fields: expected 2 fields but parsed 3' },
    ]);
    const headerParse = Papa.parse(lines.join('\n'), { header: true }).errors.map((e) => [e.row! + 2, e.message]);
    expect(headerParse).toEqual([
      [32, 'Too few fields: expected 2 fields but parsed 1'],
      [43, 'Too many fields: expected 2 fields but parsed 3'],
    ]);
  });

  it('detects a semicolon file with decimal commas and skips blank lines', () => {
    const parsed = parseCsv('lot;value\r\nA1;12,5\r\n\r\n  \r\nA2;13,0\r\n');
    expect(parsed.delimiter).toBe(';');
    expect(parsed.decimalComma).toBe(true);
    expect(parsed.records).toEqual([
      { lot: 'A1', value: '12,5' },
      { lot: 'A2', value: '13,0' },
    ]);
  });
});
