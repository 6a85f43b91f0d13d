// Reading a lab export the same way in the browser preview and on the server, so both see the same rows.
import Papa from 'papaparse';
import { detectDialect, type CsvDialect } from './dialect';
import { missingColumns, type ColumnMapping } from './mapping';
import type { RowError } from './validate';

/** UTF-8 unless the bytes are not valid UTF-8, then Windows-1252 (older lab PCs). */
export function decodeText(bytes: Uint8Array): string {
  try {
    return new TextDecoder('utf-8', { fatal: true }).decode(bytes).replace(/^\uFEFF/, '');
  } catch {
    return new TextDecoder('windows-1252').decode(bytes);
  }
}

export interface ParsedFile {
  headers: string[];
  records: Record<string, string>[];
  decimalComma: boolean;
  delimiter: CsvDialect['delimiter'];
  errors: RowError[];
}

/** Parses a CSV text by its detected dialect; what the person uploading chose overrides the detection. */
export function parseCsv(text: string, override: Partial<CsvDialect> = {}): ParsedFile {
  const detected = detectDialect(text);
  const dialect: CsvDialect = { delimiter: override.delimiter ?? detected.delimiter, decimalComma: override.decimalComma ?? detected.decimalComma };
  const parsed = Papa.parse<Record<string, string>>(text, {
    header: true,
    delimiter: dialect.delimiter,
    skipEmptyLines: 'greedy',
    transformHeader: (h) => h.trim(),
    dynamicTyping: false,
  });
  const errors: RowError[] = parsed.errors
    .filter((e) => e.code !== 'UndetectableDelimiter')
    .map((e) => ({ row: (e.row ?? 0) + 2, column: '', message: `The file cannot be read here: ${e.message}` }));
  return { headers: parsed.meta.fields ?? [], records: parsed.data, decimalComma: dialect.decimalComma, delimiter: dialect.delimiter, errors };
}

/** What is wrong with the file as a whole, before any row is read: the same words in the preview and in the server's 422. */
export function fileErrors(text: string, parsed: ParsedFile, mapping: ColumnMapping): RowError[] {
  if (parsed.headers.length === 0 || text.trim() === '') return [{ row: 1, column: '', message: 'The file is empty: it needs a header row and at least one data row' }];
  const errors: RowError[] = [];
  const missing = missingColumns(parsed.headers, mapping);
  if (missing.length) errors.push({ row: 1, column: missing.join(', '), message: `Missing column${missing.length > 1 ? 's' : ''}: ${missing.join(', ')}` });
  else if (parsed.records.length === 0) errors.push({ row: 2, column: '', message: 'The file has a header but no data rows' });
  errors.push(...parsed.errors);
  return errors;
}
