// Reading a lab export the same way in the browser preview and on the server, so both see the same rows.
// Large files are read in pieces cut at line ends, so the server never holds a 100,000-row file as objects.
import Papa from 'papaparse';
import { detectDialect, type CsvDialect } from './dialect';
import { missingColumns, type ColumnMapping } from './mapping';
import { looksLikeDate, parseNumber } from './values';
import type { RowError } from './validate';

/**
 * UTF-8 unless the bytes are not valid UTF-8, then Windows-1252 (older lab PCs). A file that starts with
 * a UTF-16 byte order mark (FF FE or FE FF, the "Unicode text" some spreadsheets save) is read as UTF-16.
 */
export function decodeText(bytes: Uint8Array): string {
  if (bytes.length >= 2 && ((bytes[0] === 0xff && bytes[1] === 0xfe) || (bytes[0] === 0xfe && bytes[1] === 0xff))) {
    return new TextDecoder(bytes[0] === 0xff ? 'utf-16le' : 'utf-16be').decode(bytes).replace(/^\uFEFF/, '');
  }
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes).replace(/^\uFEFF/, '');
  } catch {
    return new TextDecoder('windows-1252').decode(bytes);
  }
}

/**
 * Cuts a CSV text into pieces of about `size` characters, each ending at a line break outside quotes, so
 * that every piece parses on its own into whole rows. Quotes in CSV come in pairs ("" escapes one), so a
 * line break is outside quotes when the quotes before it are even in number.
 */
export function* csvPieces(text: string, size: number): Generator<string> {
  let start = 0;
  let insideQuotes = false;
  // The next quote not yet counted: a file without quotes is searched for one once, not once a piece.
  let nextQuote = text.indexOf('"');
  const quotesBefore = (end: number) => {
    let n = 0;
    while (nextQuote !== -1 && nextQuote < end) {
      n++;
      nextQuote = text.indexOf('"', nextQuote + 1);
    }
    return n;
  };
  while (start < text.length) {
    let cut = text.length;
    let from = Math.min(text.length, start + size);
    while (from < text.length) {
      const lineEnd = text.indexOf('\n', from);
      if (lineEnd === -1) break;
      if (quotesBefore(lineEnd) % 2 === 1) insideQuotes = !insideQuotes;
      if (!insideQuotes) {
        cut = lineEnd + 1;
        break;
      }
      from = lineEnd + 1;
    }
    yield text.slice(start, cut);
    start = cut;
  }
}

/** Rows of cells from one piece, with the file row number of the first (the header is row 1). */
export interface CsvRows {
  /** Every data row of the piece, in file order; unreadable ones too, so that numbering stays the file's. */
  rows: string[][];
  /** File row number of rows[0], counting data rows after the header from 2. */
  firstRow: number;
  /** Rows that cannot be read (unbalanced quotes, too few or too many fields). */
  errors: RowError[];
  /** Indexes into `rows` of the unreadable rows, which validation leaves to their error. */
  unreadable: Set<number>;
}

export interface CsvReading {
  headers: string[];
  dialect: CsvDialect;
  /** The data rows, piece by piece; taking a piece parses it. */
  pieces: Generator<CsvRows>;
}

const PIECE_SIZE = 1 << 20;

/** A row of nothing but blanks and delimiters, which a spreadsheet leaves at the end of an export. */
const isBlankRow = (cells: string[]) => cells.every((c) => c.trim() === '');

/**
 * Rows of a piece without a single quote character: nothing can be quoted, so lines and fields split
 * at their separators, as Papa Parse would split them, several times faster. Null when the piece has
 * quotes or a carriage return that does not end a line.
 */
function splitUnquoted(piece: string, delimiter: string): string[][] | null {
  if (piece.includes('"')) return null;
  const rows: string[][] = [];
  for (let line of piece.split('\n')) {
    if (line.endsWith('\r')) line = line.slice(0, -1);
    if (line === '') continue;
    if (line.includes('\r')) return null;
    rows.push(line.split(delimiter));
  }
  return rows;
}

function parsePiece(piece: string, delimiter: CsvDialect['delimiter']): { data: string[][]; bad: Map<number, string> } {
  const plain = splitUnquoted(piece, delimiter);
  if (plain) return { data: plain.filter((cells) => cells[0].trim() !== '' || !isBlankRow(cells)), bad: new Map() };
  const parsed = Papa.parse<string[]>(piece, { header: false, delimiter, skipEmptyLines: true, dynamicTyping: false });
  const errorsByRow = new Map<number, string>();
  for (const e of parsed.errors) if (e.code !== 'UndetectableDelimiter' && e.row !== undefined && !errorsByRow.has(e.row)) errorsByRow.set(e.row, e.message);
  // Blank rows are dropped here rather than by Papa's "greedy" option, which joins every row to test it;
  // the first cell decides for almost every row.
  const data: string[][] = [];
  const bad = new Map<number, string>();
  parsed.data.forEach((cells, i) => {
    if (cells[0].trim() === '' && isBlankRow(cells)) return;
    const problem = errorsByRow.get(i);
    if (problem !== undefined) bad.set(data.length, problem);
    data.push(cells);
  });
  return { data, bad };
}

/** Names the rows that cannot be read, with the same words Papa Parse uses for field counts. */
function checkRows(rows: string[][], firstRow: number, fields: number, bad: Map<number, string>): CsvRows {
  const errors: RowError[] = [];
  const unreadable = new Set<number>();
  for (let i = 0; i < rows.length; i++) {
    const n = rows[i].length;
    const problem =
      bad.get(i) ??
      (n < fields ? `Too few fields: expected ${fields} fields but parsed ${n}` : n > fields ? `Too many fields: expected ${fields} fields but parsed ${n}` : undefined);
    if (problem === undefined) continue;
    errors.push({ row: firstRow + i, column: '', message: `The file cannot be read here: ${problem}` });
    unreadable.add(i);
  }
  return { rows, firstRow, errors, unreadable };
}

/** Reads a CSV text by its detected dialect, what the person uploading chose overriding the detection. */
export function readCsv(text: string, override: Partial<CsvDialect> = {}, pieceSize = PIECE_SIZE): CsvReading {
  const detected = detectDialect(text);
  const dialect: CsvDialect = { delimiter: override.delimiter ?? detected.delimiter, decimalComma: override.decimalComma ?? detected.decimalComma };
  const source = csvPieces(text, pieceSize);
  let headers: string[] = [];
  let first: CsvRows | null = null;
  let nextRow = 2;

  // The header is the first row of the first piece that has one; the rest of that piece is data.
  // (next() rather than for-of: leaving a for-of would close the generator.)
  for (let step = source.next(); !step.done; step = source.next()) {
    const { data, bad } = parsePiece(step.value, dialect.delimiter);
    if (data.length === 0) continue;
    headers = data[0].map((h) => h.trim());
    const shifted = new Map([...bad].filter(([i]) => i > 0).map(([i, m]) => [i - 1, m] as const));
    first = checkRows(data.slice(1), 2, headers.length, shifted);
    nextRow = 2 + first.rows.length;
    break;
  }

  function* pieces(): Generator<CsvRows> {
    if (first) yield first;
    for (const piece of source) {
      const { data, bad } = parsePiece(piece, dialect.delimiter);
      const out = checkRows(data, nextRow, headers.length, bad);
      nextRow += data.length;
      yield out;
    }
  }
  return { headers, dialect, pieces: pieces() };
}

export interface ParsedFile {
  headers: string[];
  records: Record<string, string>[];
  decimalComma: boolean;
  delimiter: CsvDialect['delimiter'];
  errors: RowError[];
}

/** Parses a whole CSV text into records by header, for the preview of a file in the browser. */
export function parseCsv(text: string, override: Partial<CsvDialect> = {}): ParsedFile {
  const reading = readCsv(text, override);
  const records: Record<string, string>[] = [];
  const errors: RowError[] = [];
  for (const piece of reading.pieces) {
    errors.push(...piece.errors);
    for (const cells of piece.rows) {
      const rec: Record<string, string> = {};
      reading.headers.forEach((h, i) => {
        if (cells[i] !== undefined) rec[h] = cells[i];
      });
      records.push(rec);
    }
  }
  return { headers: reading.headers, records, decimalComma: reading.dialect.decimalComma, delimiter: reading.dialect.delimiter, errors };
}

/** The start of a file that decides whether it is text: as much as the dialect's detection reads. */
const SNIFF_CHARACTERS = 65_536;
/** Control characters no text export writes (C0 except tab, line feed, form feed and carriage return; DEL), and whether a NUL is among them. */
function controlCharacters(text: string): { count: number; nul: boolean } {
  let count = 0;
  let nul = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if ((c < 32 && c !== 9 && c !== 10 && c !== 12 && c !== 13) || c === 127) {
      count++;
      if (c === 0) nul = true;
    }
  }
  return { count, nul };
}

/** Whether a header cell holds a value rather than a column's name: a date, or a number. */
const looksLikeData = (cell: string) => looksLikeDate(cell) || parseNumber(cell, false) !== null || parseNumber(cell, true) !== null;

/**
 * Why a text cannot be a results file, in words for the technician who chose it; null when it may be one.
 * Binary content (a workbook, a PDF, a picture), no delimiter anywhere in the first line, or a first
 * line of values rather than column names: no mapping of columns can make rows of these.
 */
export function notAResultsFile(text: string): string | null {
  const start = text.slice(0, SNIFF_CHARACTERS);
  // A NUL never appears in a text export; a few stray control characters may, a binary file is full of them.
  const controls = controlCharacters(start);
  if (controls.nul || controls.count > Math.max(2, start.length / 100)) {
    return 'This is not a results file: it holds binary content, not text (a spreadsheet workbook, a PDF or a picture?). Export the results as CSV from the spreadsheet or the instrument and choose that file';
  }
  const firstLine = /[^\r\n]*\S[^\r\n]*/.exec(start)?.[0];
  if (firstLine === undefined) return null;
  if (!/[,;\t]/.test(firstLine)) {
    return 'This is not a results file: no delimiter was found. Its first line has no comma, semicolon or tab between column names, so it has no columns to read';
  }
  const delimiter = detectDialect(start).delimiter;
  const cells = firstLine.split(delimiter).map((c) => c.trim().replace(/^"(.*)"$/, '$1')).filter((c) => c !== '');
  const values = cells.filter(looksLikeData);
  if (cells.length === 0 || values.some((c) => looksLikeDate(c)) || values.length * 2 >= cells.length) {
    return `This is not a results file: it has no header. Its first line holds values (${values.slice(0, 3).join(', ') || 'empty cells'}), not column names; add the header line of the CSV template`;
  }
  return null;
}

/** What is wrong with the file as a whole, before any row is read: the same words in the preview and in the server's 422. */
export function fileErrors(text: string, headers: string[], rowsTotal: number | null, mapping: ColumnMapping): RowError[] {
  if (headers.length === 0 || text.trim() === '') return [{ row: 1, column: '', message: 'The file is empty: it needs a header row and at least one data row' }];
  const notResults = rowsTotal === null ? notAResultsFile(text) : null;
  if (notResults) return [{ row: 1, column: '', message: notResults }];
  const missing = missingColumns(headers, mapping);
  if (missing.length) return [{ row: 1, column: missing.join(', '), message: `Missing column${missing.length > 1 ? 's' : ''}: ${missing.join(', ')}` }];
  if (rowsTotal === 0) return [{ row: 2, column: '', message: 'The file has a header but no data rows' }];
  return [];
}
