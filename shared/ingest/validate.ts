import type { CanonicalColumn, CanonicalRow } from './mapping';
import { parseNumber, parsePlantDateTime } from './values';

/** What validation needs to know of the plant's configuration. */
export interface IngestCatalogue {
  timeZone: string;
  lineCodes: ReadonlySet<string>;
  productCodes: ReadonlySet<string>;
  characteristics: ReadonlyMap<
    string,
    { productCode: string; name: string; unit: string; subgroupSize: number; physicalMin: number; physicalMax: number; physicalMaxExclusive: boolean }
  >;
}

/** One measurement ready to store. */
export interface ValidMeasurement {
  row: number;
  lot: string;
  product: string;
  line: string;
  producedAt: number;
  shift: string | null;
  characteristic: string;
  replicate: number;
  value: number;
  testedAt: number | null;
  operator: string | null;
  note: string | null;
}

export interface RowError {
  row: number;
  column: string;
  message: string;
}

export interface ValidationResult {
  valid: ValidMeasurement[];
  errors: RowError[];
}

const MAX_TEXT = 500;
const lotPattern = /^[A-Za-z0-9][A-Za-z0-9._/-]{0,63}$/;

// Module-level helpers rather than closures per row: a 100,000-row file allocates far less.
function fail(out: RowError[], r: CanonicalRow, c: CanonicalColumn, message: string): void {
  out.push({ row: r.row, column: r.sourceColumn[c] ?? c, message });
}

const cellText = (r: CanonicalRow, c: CanonicalColumn) => (r.cells[c] ?? '').trim();

/**
 * Checks every row against the catalogue and against the other rows of the same file. Nothing is
 * guessed: a cell that does not parse is an error naming the row and the file's column.
 */
export function validateRows(rows: CanonicalRow[], cat: IngestCatalogue, opts: { decimalComma: boolean }): ValidationResult {
  const valid: ValidMeasurement[] = [];
  const errors: RowError[] = [];
  const lotsSeen = new Map<string, { product: string; line: string; producedAt: number; row: number }>();
  const keysSeen = new Map<string, number>();
  const implicitReplicate = new Map<string, number>();

  for (const r of rows) {
    const rowErrors: RowError[] = [];

    const lot = cellText(r, 'lot');
    if (!lot) fail(rowErrors, r, 'lot', 'Lot number is missing');
    else if (!lotPattern.test(lot)) fail(rowErrors, r, 'lot', `Lot number "${lot}" may hold only letters, digits and . _ / - (at most 64)`);

    const product = cellText(r, 'product');
    if (!product) fail(rowErrors, r, 'product', 'Product code is missing');
    else if (!cat.productCodes.has(product)) fail(rowErrors, r, 'product', `Unknown product code "${product}"`);

    const line = cellText(r, 'line');
    if (!line) fail(rowErrors, r, 'line', 'Production line is missing');
    else if (!cat.lineCodes.has(line)) fail(rowErrors, r, 'line', `Unknown production line "${line}"`);

    const producedText = cellText(r, 'produced_at');
    const producedAt = producedText ? parsePlantDateTime(producedText, cat.timeZone) : null;
    if (!producedText) fail(rowErrors, r, 'produced_at', 'Production date is missing');
    else if (producedAt === null) fail(rowErrors, r, 'produced_at', `"${producedText}" is not a date: use ISO 8601 (2026-11-30T06:15) or dd.mm.yyyy HH:MM`);

    const code = cellText(r, 'characteristic');
    const ch = code ? cat.characteristics.get(code) : undefined;
    if (!code) fail(rowErrors, r, 'characteristic', 'Characteristic code is missing');
    else if (!ch) fail(rowErrors, r, 'characteristic', `Unknown characteristic code "${code}"`);
    else if (product && cat.productCodes.has(product) && ch.productCode !== product) {
      fail(rowErrors, r, 'characteristic', `Characteristic ${code} belongs to product ${ch.productCode}, not ${product}`);
    }

    const valueText = cellText(r, 'value');
    const value = valueText ? parseNumber(valueText, opts.decimalComma) : null;
    if (!valueText) fail(rowErrors, r, 'value', 'Value is missing');
    else if (value === null) fail(rowErrors, r, 'value', `"${valueText}" is not a number${opts.decimalComma ? '' : ' (this file uses "." as the decimal mark)'}`);
    else if (ch) {
      const above = ch.physicalMaxExclusive ? value >= ch.physicalMax : value > ch.physicalMax;
      if (value < ch.physicalMin || above) {
        fail(rowErrors, r, 'value', `${value} ${ch.unit} is not a possible ${ch.name} (possible: ${ch.physicalMin} to ${ch.physicalMaxExclusive ? 'below ' : ''}${ch.physicalMax} ${ch.unit})`);
      }
    }

    let replicate: number | null = null;
    const replicateText = cellText(r, 'replicate');
    if (replicateText) {
      replicate = /^\d+$/.test(replicateText) ? Number(replicateText) : null;
      if (replicate === null || replicate < 1) fail(rowErrors, r, 'replicate', `Replicate "${replicateText}" must be a whole number from 1`);
    } else if (lot && code) {
      replicate = (implicitReplicate.get(`${lot}\u0000${code}`) ?? 0) + 1;
      implicitReplicate.set(`${lot}\u0000${code}`, replicate);
    }
    if (replicate !== null && replicate >= 1 && ch && replicate > ch.subgroupSize) {
      fail(rowErrors, r, 'replicate', `${code} takes ${ch.subgroupSize} replicate${ch.subgroupSize === 1 ? '' : 's'} per lot; replicate ${replicate} is one too many`);
    }

    const testedText = cellText(r, 'tested_at');
    const testedAt = testedText ? parsePlantDateTime(testedText, cat.timeZone) : null;
    if (testedText && testedAt === null) fail(rowErrors, r, 'tested_at', `"${testedText}" is not a date: use ISO 8601 or dd.mm.yyyy HH:MM`);
    else if (testedAt !== null && producedAt !== null && testedAt < producedAt - 60_000) fail(rowErrors, r, 'tested_at', 'Test time is before the lot was produced');

    for (const c of ['shift', 'operator', 'note'] as const) if (cellText(r, c).length > MAX_TEXT) fail(rowErrors, r, c, `Keep ${c} under ${MAX_TEXT} characters`);

    if (lot && producedAt !== null && product && line) {
      const seen = lotsSeen.get(lot);
      if (!seen) lotsSeen.set(lot, { product, line, producedAt, row: r.row });
      else if (seen.product !== product || seen.line !== line || seen.producedAt !== producedAt) {
        fail(rowErrors, r, 'lot', `Lot ${lot} has another product, line or production time on row ${seen.row}`);
      }
    }
    if (lot && code && replicate !== null) {
      const key = `${lot}\u0000${code}\u0000${replicate}`;
      const first = keysSeen.get(key);
      if (first !== undefined) fail(rowErrors, r, 'replicate', `Duplicate: row ${first} already gives ${code} replicate ${replicate} of lot ${lot}`);
      else keysSeen.set(key, r.row);
    }

    if (rowErrors.length) {
      errors.push(...rowErrors);
      continue;
    }
    valid.push({
      row: r.row,
      lot,
      product,
      line,
      producedAt: producedAt!,
      shift: cellText(r, 'shift') ? cellText(r, 'shift').toLowerCase() : null,
      characteristic: code,
      replicate: replicate!,
      value: value!,
      testedAt,
      operator: cellText(r, 'operator') || null,
      note: cellText(r, 'note') || null,
    });
  }
  return { valid, errors };
}
