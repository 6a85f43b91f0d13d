import type { CanonicalColumn, CanonicalRow } from './mapping';
import { looksLikeDate, parseNumber, parsePlantDateTime } from './values';

/** What validation needs to know of the plant's configuration. */
export interface IngestCatalogue {
  timeZone: string;
  lineCodes: ReadonlySet<string>;
  productCodes: ReadonlySet<string>;
  /** Per product code, the lines that make it; a product the catalogue ties to no line may come from any. */
  productLines: ReadonlyMap<string, ReadonlySet<string>>;
  characteristics: ReadonlyMap<
    string,
    { productCode: string; name: string; unit: string; subgroupSize: number; physicalMin: number; physicalMax: number; physicalMaxExclusive: boolean }
  >;
  /** Codes of characteristics an administrator deactivated: named as such rather than as unknown. */
  deactivatedCharacteristics?: ReadonlySet<string>;
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

export interface ValidationOptions {
  decimalComma: boolean;
  /** The time the rows are checked at (epoch ms): what "later than now" means; the clock's now when absent. */
  now?: number;
}

export interface ValidationResult {
  valid: ValidMeasurement[];
  errors: RowError[];
}

const MAX_TEXT = 500;
/**
 * How far ahead of the checking computer's clock a production or test time may lie: a lab PC or
 * instrument whose clock runs a few minutes fast is no reason to refuse its results, months ahead is.
 */
export const FUTURE_ALLOWANCE_MINUTES = 15;
const lotPattern = /^[A-Za-z0-9][A-Za-z0-9._/-]{0,63}$/;

// Module-level helpers rather than closures per row: a 100,000-row file allocates far less.
function fail(out: RowError[], r: CanonicalRow, c: CanonicalColumn, message: string): void {
  out.push({ row: r.row, column: r.sourceColumn[c] ?? c, message });
}

const trimmed = (cell: string | undefined) => (cell === undefined ? '' : cell.trim());

/** The codes a cell may hold, for a message: all of them when few, else the first few. */
function knownCodes(codes: Iterable<string>): string {
  const sorted = [...codes].sort();
  return sorted.length <= 12 ? sorted.join(', ') : `${sorted.slice(0, 12).join(', ')}, …`;
}

function unknownCharacteristic(cat: IngestCatalogue, code: string, product: string): string {
  if (cat.deactivatedCharacteristics?.has(code)) return `Characteristic ${code} is deactivated and takes no more results; an administrator can reactivate it`;
  const ofProduct = [...cat.characteristics].filter(([, c]) => c.productCode === product).map(([k]) => k);
  return ofProduct.length ? `Unknown characteristic code "${code}" (${product} has: ${knownCodes(ofProduct)})` : `Unknown characteristic code "${code}"`;
}

function inTheFuture(text: string, column: 'produced_at' | 'tested_at'): string {
  const what = column === 'produced_at' ? 'Production time' : 'Test time';
  const why = column === 'produced_at' ? 'a lot cannot have been made in the future' : 'a sample cannot have been tested in the future';
  return `${what} "${text}" is later than now: ${why} (up to ${FUTURE_ALLOWANCE_MINUTES} minutes ahead are taken, for clocks that differ)`;
}

function notADate(text: string, column: 'produced_at' | 'tested_at'): string {
  if (looksLikeDate(text)) return `"${text}" is not a day and time of the calendar: check the day, month and hour`;
  return column === 'produced_at' ? `"${text}" is not a date: use ISO 8601 (2026-11-30T06:15) or dd.mm.yyyy HH:MM` : `"${text}" is not a date: use ISO 8601 or dd.mm.yyyy HH:MM`;
}

/**
 * Checks rows one at a time against the catalogue and against the rows of the same file seen before,
 * so a large file can be checked piece by piece. Nothing is guessed: a cell that does not parse is an
 * error naming the row and the file's column.
 */
export class RowValidator {
  /** Every problem found so far, in the order found. */
  readonly errors: RowError[] = [];
  /**
   * Per lot number: how the file first gave the lot (null until a row gave it completely), and the
   * readings given so far as flat (characteristic code, replicate, row) triples. One entry a lot keeps a
   * 100,000-row file to one map of lots instead of another of every reading.
   */
  private readonly lots = new Map<string, { first: { product: string; line: string; producedAt: number; row: number } | null; readings: (string | number)[] }>();
  /** The last production and test time read and their instants: a lot's rows repeat the same times. */
  private readonly lastDate = { produced_at: { text: '', ms: null as number | null }, tested_at: { text: '', ms: null as number | null } };

  /** The latest production or test time taken: now and the allowance, worked out once for the whole file. */
  private readonly latest: number;

  constructor(
    private readonly cat: IngestCatalogue,
    private readonly opts: ValidationOptions,
  ) {
    this.latest = (opts.now ?? Date.now()) + FUTURE_ALLOWANCE_MINUTES * 60_000;
  }

  private date(column: 'produced_at' | 'tested_at', text: string): number | null {
    const last = this.lastDate[column];
    if (text !== last.text) {
      last.text = text;
      last.ms = parsePlantDateTime(text, this.cat.timeZone);
    }
    return last.ms;
  }

  /** The row as a measurement to store, or null when it has errors (added to `errors`). */
  check(r: CanonicalRow): ValidMeasurement | null {
    const { cat, opts } = this;
    const rowErrors: RowError[] = [];
    // Each cell read once, by name: a 100,000-row file reads 1.1 million of them.
    const cells = r.cells;

    const lot = trimmed(cells.lot);
    // A lot number seen before passed the pattern then: only lots that did are remembered.
    const entry = lot ? this.lots.get(lot) : undefined;
    const lotOk = lot !== '' && (entry !== undefined || lotPattern.test(lot));
    if (!lot) fail(rowErrors, r, 'lot', 'Lot number is missing');
    else if (!lotOk) fail(rowErrors, r, 'lot', `Lot number "${lot}" may hold only letters, digits and . _ / - (at most 64)`);

    const product = trimmed(cells.product);
    if (!product) fail(rowErrors, r, 'product', 'Product code is missing');
    else if (!cat.productCodes.has(product)) fail(rowErrors, r, 'product', `Unknown product code "${product}" (products: ${knownCodes(cat.productCodes)})`);

    const line = trimmed(cells.line);
    if (!line) fail(rowErrors, r, 'line', 'Production line is missing');
    else if (!cat.lineCodes.has(line)) fail(rowErrors, r, 'line', `Unknown production line "${line}" (lines: ${knownCodes(cat.lineCodes)})`);
    else {
      const makers = cat.productLines.get(product);
      if (makers !== undefined && !makers.has(line)) fail(rowErrors, r, 'line', `Product ${product} is not made on line ${line} (${product} is made on ${knownCodes(makers)})`);
    }

    const producedText = trimmed(cells.produced_at);
    const producedAt = producedText ? this.date('produced_at', producedText) : null;
    if (!producedText) fail(rowErrors, r, 'produced_at', 'Production date is missing');
    else if (producedAt === null) fail(rowErrors, r, 'produced_at', notADate(producedText, 'produced_at'));
    else if (producedAt > this.latest) fail(rowErrors, r, 'produced_at', inTheFuture(producedText, 'produced_at'));

    const code = trimmed(cells.characteristic);
    const ch = code ? cat.characteristics.get(code) : undefined;
    if (!code) fail(rowErrors, r, 'characteristic', 'Characteristic code is missing');
    else if (!ch) fail(rowErrors, r, 'characteristic', unknownCharacteristic(cat, code, product));
    else if (product && cat.productCodes.has(product) && ch.productCode !== product) {
      fail(rowErrors, r, 'characteristic', `Characteristic ${code} belongs to product ${ch.productCode}, not ${product}`);
    }

    const valueText = trimmed(cells.value);
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
    const replicateText = trimmed(cells.replicate);
    if (replicateText) {
      replicate = /^\d+$/.test(replicateText) ? Number(replicateText) : null;
      if (replicate === null || replicate < 1) fail(rowErrors, r, 'replicate', `Replicate "${replicateText}" must be a whole number from 1`);
    } else if (lot && code) {
      // Without a replicate column, a lot's readings of a characteristic count 1, 2, 3 in file order.
      const given = entry?.readings ?? [];
      replicate = 1;
      for (let i = 0; i < given.length; i += 3) if (given[i] === code) replicate = Math.max(replicate, (given[i + 1] as number) + 1);
    }
    if (replicate !== null && replicate >= 1 && ch && replicate > ch.subgroupSize) {
      fail(rowErrors, r, 'replicate', `${code} takes ${ch.subgroupSize} replicate${ch.subgroupSize === 1 ? '' : 's'} per lot; replicate ${replicate} is one too many`);
    }

    const testedText = trimmed(cells.tested_at);
    const testedAt = testedText ? this.date('tested_at', testedText) : null;
    if (testedText && testedAt === null) fail(rowErrors, r, 'tested_at', notADate(testedText, 'tested_at'));
    else if (testedAt !== null && testedAt > this.latest) fail(rowErrors, r, 'tested_at', inTheFuture(testedText, 'tested_at'));
    // A production time in the future is its own error; measured against it, any test time would be early.
    else if (testedAt !== null && producedAt !== null && producedAt <= this.latest && testedAt < producedAt - 60_000) {
      fail(rowErrors, r, 'tested_at', 'Test time is before the lot was produced');
    }

    const shift = trimmed(cells.shift);
    const operator = trimmed(cells.operator);
    const note = trimmed(cells.note);
    if (shift.length > MAX_TEXT) fail(rowErrors, r, 'shift', `Keep shift under ${MAX_TEXT} characters`);
    if (operator.length > MAX_TEXT) fail(rowErrors, r, 'operator', `Keep operator under ${MAX_TEXT} characters`);
    if (note.length > MAX_TEXT) fail(rowErrors, r, 'note', `Keep note under ${MAX_TEXT} characters`);

    if (lotOk) {
      let known = entry;
      if (!known) this.lots.set(lot, (known = { first: null, readings: [] }));
      const seen = known.first;
      if (producedAt !== null && product && line) {
        if (!seen) known.first = { product, line, producedAt, row: r.row };
        else if (seen.product !== product || seen.line !== line || seen.producedAt !== producedAt) {
          fail(rowErrors, r, 'lot', `Lot ${lot} has another product, line or production time on row ${seen.row}`);
        }
      }
      if (code && replicate !== null) {
        const given = known.readings;
        let first: number | undefined;
        for (let i = 0; i < given.length && first === undefined; i += 3) if (given[i] === code && given[i + 1] === replicate) first = given[i + 2] as number;
        if (first !== undefined) fail(rowErrors, r, 'replicate', `Duplicate: row ${first} already gives ${code} replicate ${replicate} of lot ${lot}`);
        else given.push(code, replicate, r.row);
      }
    }

    if (rowErrors.length) {
      this.errors.push(...rowErrors);
      return null;
    }
    return {
      row: r.row,
      lot,
      product,
      line,
      producedAt: producedAt!,
      shift: shift ? shift.toLowerCase() : null,
      characteristic: code,
      replicate: replicate!,
      value: value!,
      testedAt,
      operator: operator || null,
      note: note || null,
    };
  }
}

/** Checks a whole set of rows at once (the browser's preview of a file, manual entry). */
export function validateRows(rows: CanonicalRow[], cat: IngestCatalogue, opts: ValidationOptions): ValidationResult {
  const validator = new RowValidator(cat, opts);
  const valid: ValidMeasurement[] = [];
  for (const r of rows) {
    const m = validator.check(r);
    if (m) valid.push(m);
  }
  return { valid, errors: validator.errors };
}
