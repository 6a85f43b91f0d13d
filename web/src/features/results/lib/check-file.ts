import { applyMapping, fileErrors, validateRows, type ColumnMapping, type IngestCatalogue, type ParsedFile, type RowError, type ValidMeasurement } from '../../../../../shared/ingest';

export interface FileCheck {
  valid: ValidMeasurement[];
  /** Every problem, file-level ones first, then by row. */
  errors: RowError[];
  /** Rows of the file that have at least one error. */
  rowsWithErrors: Set<number>;
}

const canonicalLong: ColumnMapping = { format: 'long', columns: {} };

/** The checks the server runs on an upload, short of comparing with what is stored already. */
export function checkFile(text: string, parsed: ParsedFile, mapping: ColumnMapping | undefined, catalogue: IngestCatalogue): FileCheck {
  const used = mapping ?? canonicalLong;
  const problems = fileErrors(text, parsed, used);
  const rows = problems.length ? [] : applyMapping(parsed.records, used);
  const { valid, errors } = validateRows(rows, catalogue, { decimalComma: parsed.decimalComma });
  const all = [...problems, ...errors].sort((a, b) => a.row - b.row);
  return { valid, errors: all, rowsWithErrors: new Set(all.map((e) => e.row)) };
}
