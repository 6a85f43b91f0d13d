import { readResults, type ColumnMapping, type IngestCatalogue, type ParsedFile, type RowError, type ValidMeasurement } from '@shared/ingest';

export interface FileCheck {
  valid: ValidMeasurement[];
  /** Every problem, file-level ones first, then by row. */
  errors: RowError[];
  /** Rows of the file that have at least one error. */
  rowsWithErrors: Set<number>;
}

/** The checks the server runs on an upload, short of comparing with what is stored already. */
export function checkFile(text: string, parsed: ParsedFile, mapping: ColumnMapping | undefined, catalogue: IngestCatalogue): FileCheck {
  const reading = readResults(text, { dialect: { delimiter: parsed.delimiter, decimalComma: parsed.decimalComma }, mapping, catalogue });
  const valid: ValidMeasurement[] = [];
  for (const batch of reading.batches) valid.push(...batch);
  const all = [...reading.errors].sort((a, b) => a.row - b.row);
  return { valid, errors: all, rowsWithErrors: new Set(all.map((e) => e.row)) };
}
