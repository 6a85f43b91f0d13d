// Every CSV Prismline writes goes through these: RFC 4180 fields (comma, dot decimals, CRLF, quotes where
// needed), UTF-8 with a byte-order mark so a spreadsheet reads accents right, and no cell a spreadsheet
// would run as a formula. A text starting with = + - @, a tab or a carriage return is kept readable but
// inert by a leading apostrophe (the OWASP "CSV injection" advice); a cell that is wholly a plain decimal
// number ("-1.25") is a figure and stays as it is.

/** The UTF-8 byte-order mark a CSV file starts with. */
export const CSV_BOM = '\uFEFF';

/** The line end of every CSV row. */
export const CSV_EOL = '\r\n';

const PLAIN_NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const FORMULA_START = /^[=+\-@\t\r]/;

/** A spreadsheet would evaluate this text as a formula (or a DDE command) when the file is opened. */
export function runsAsFormula(text: string): boolean {
  return FORMULA_START.test(text) && !PLAIN_NUMBER.test(text);
}

/** The text with a leading apostrophe when a spreadsheet would run it as a formula. */
export function neutraliseFormula(text: string): string {
  return runsAsFormula(text) ? `'${text}` : text;
}

export type CsvValue = string | number | boolean | null | undefined;

/** One CSV field: empty for null, neutralised, quoted when it holds a comma, quote, line break or edge space. */
export function csvField(value: CsvValue): string {
  if (value === null || value === undefined) return '';
  const text = neutraliseFormula(typeof value === 'number' && !Number.isFinite(value) ? '' : String(value));
  return /[",;\r\n]|^\s|\s$/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

/** One CSV row with its line end. */
export function csvRow(values: readonly CsvValue[]): string {
  return values.map(csvField).join(',') + CSV_EOL;
}

/** A whole CSV document: the byte-order mark, then every row. */
export function csvDocument(rows: readonly (readonly CsvValue[])[]): string {
  return CSV_BOM + rows.map(csvRow).join('');
}
