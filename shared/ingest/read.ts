// A results file from text to checked measurements, piece by piece: the one reading the browser's
// preview and the server's import share, so both name the same rows with the same words.
import { fileErrors, readCsv } from './csv';
import type { CsvDialect } from './dialect';
import { rowMapper, type ColumnMapping } from './mapping';
import { RowValidator, type IngestCatalogue, type RowError, type ValidMeasurement } from './validate';

export interface ResultsReading {
  dialect: CsvDialect;
  headers: string[];
  /** Valid measurements, piece by piece. `errors` and `rowsTotal` grow as the pieces are taken. */
  batches: Generator<ValidMeasurement[]>;
  /** Every problem found so far: file-level ones (row 1), unreadable rows, then row checks, in file order per piece. */
  readonly errors: RowError[];
  /** Data rows read so far. */
  readonly rowsTotal: number;
}

const canonicalLong: ColumnMapping = { format: 'long', columns: {} };

export function readResults(
  text: string,
  opts: { dialect?: Partial<CsvDialect>; mapping?: ColumnMapping; catalogue: IngestCatalogue; pieceSize?: number; /** What "later than now" means for the whole file (epoch ms). */ now?: number },
): ResultsReading {
  const mapping = opts.mapping ?? canonicalLong;
  const csv = readCsv(text, opts.dialect, opts.pieceSize);
  const validator = new RowValidator(opts.catalogue, { decimalComma: csv.dialect.decimalComma, now: opts.now });
  const errors = validator.errors;
  let rowsTotal = 0;

  function* batches(): Generator<ValidMeasurement[]> {
    const before = fileErrors(text, csv.headers, null, mapping);
    if (before.length) {
      errors.push(...before);
      return;
    }
    const map = rowMapper(csv.headers, mapping);
    for (const piece of csv.pieces) {
      errors.push(...piece.errors);
      rowsTotal += piece.rows.length;
      const valid: ValidMeasurement[] = [];
      for (let i = 0; i < piece.rows.length; i++) {
        if (piece.unreadable.has(i)) continue;
        for (const row of map(piece.rows[i], piece.firstRow + i)) {
          const m = validator.check(row);
          if (m) valid.push(m);
        }
      }
      yield valid;
    }
    errors.push(...fileErrors(text, csv.headers, rowsTotal, mapping));
  }

  return {
    dialect: csv.dialect,
    headers: csv.headers,
    batches: batches(),
    errors,
    get rowsTotal() {
      return rowsTotal;
    },
  };
}
