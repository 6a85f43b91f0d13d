import { z } from 'zod';

/** The canonical long upload format: one measurement a row. */
export const requiredColumns = ['lot', 'product', 'line', 'produced_at', 'characteristic', 'value'] as const;
export const optionalColumns = ['shift', 'replicate', 'tested_at', 'operator', 'note'] as const;
export const canonicalColumns = [...requiredColumns, ...optionalColumns] as const;
export type CanonicalColumn = (typeof canonicalColumns)[number];
/** Lot-level columns of a wide file (one row a lot). */
export const wideLotColumns = ['lot', 'product', 'line', 'produced_at', 'shift', 'tested_at', 'operator', 'note'] as const;

const header = z.string().trim().min(1, 'Choose a column of the file').max(200);

/** How the columns of a lab export map onto the canonical format; saved and reused per export type. */
export const columnMappingSchema = z.discriminatedUnion('format', [
  z.object({
    /** Long: one measurement per row. */
    format: z.literal('long'),
    /** Canonical column → the file's header; columns left out keep their canonical name. */
    columns: z.partialRecord(z.enum(canonicalColumns), header).default({}),
  }),
  z.object({
    /** Wide: one row per lot, one column per characteristic code. */
    format: z.literal('wide'),
    /** Lot-level canonical column → the file's header. */
    columns: z.partialRecord(z.enum(wideLotColumns), header).default({}),
    /** The file's header → characteristic code; several headers may map to one code (replicates in order). */
    characteristicColumns: z.record(header, z.string().trim().min(1, 'Choose a characteristic')).refine((m) => Object.keys(m).length > 0, {
      message: 'Map at least one column to a characteristic',
    }),
  }),
]);
export type ColumnMapping = z.infer<typeof columnMappingSchema>;

/** POST /api/v1/column-mappings */
export const saveMappingSchema = z.object({
  /** Name the technicians recognise, e.g. "Press export (wide)". */
  name: z.string().trim().min(2, 'Give the mapping a name of at least 2 characters').max(80, 'Keep the name under 80 characters'),
  /** The mapping itself. */
  mapping: columnMappingSchema,
});
export type SaveMappingInput = z.infer<typeof saveMappingSchema>;

/** A long-format row: canonical column → raw cell text, with the file's line number. */
export interface CanonicalRow {
  /** Line number in the file as a spreadsheet shows it (the header is line 1). */
  row: number;
  cells: Partial<Record<CanonicalColumn, string>>;
  /** For each canonical column, the header it came from, so errors name the file's own column. */
  sourceColumn: Partial<Record<CanonicalColumn, string>>;
}

/**
 * Turns a file's rows of cells into canonical long rows through a mapping: one row a measurement for a
 * long file, one per filled characteristic cell for a wide one. Built once per file from its headers.
 */
export function rowMapper(headers: readonly string[], mapping: ColumnMapping): (cells: readonly string[], row: number) => CanonicalRow[] {
  const indexOf = new Map<string, number>();
  headers.forEach((h, i) => {
    if (!indexOf.has(h)) indexOf.set(h, i);
  });
  if (mapping.format === 'long') {
    const source = Object.fromEntries(canonicalColumns.map((c) => [c, mapping.columns[c] ?? c])) as Record<CanonicalColumn, string>;
    // One object shape for every row (absent columns undefined): a 100,000-row file stays on V8's fast path.
    const [lot, product, line, producedAt, characteristic, value, shift, replicate, testedAt, operator, note] = canonicalColumns.map((c) => indexOf.get(source[c]) ?? -1);
    return (cells, row) => [
      {
        row,
        cells: {
          lot: cells[lot],
          product: cells[product],
          line: cells[line],
          produced_at: cells[producedAt],
          characteristic: cells[characteristic],
          value: cells[value],
          shift: cells[shift],
          replicate: cells[replicate],
          tested_at: cells[testedAt],
          operator: cells[operator],
          note: cells[note],
        },
        sourceColumn: source,
      },
    ];
  }
  const lotSource = Object.fromEntries(wideLotColumns.map((c) => [c, mapping.columns[c] ?? c])) as Record<string, string>;
  const lotColumns = wideLotColumns.map((c) => [c, indexOf.get(lotSource[c])] as const).filter((e): e is readonly [(typeof wideLotColumns)[number], number] => e[1] !== undefined);
  const valueColumns = Object.entries(mapping.characteristicColumns).map(([headerName, code]) => ({ headerName, code, index: indexOf.get(headerName) }));
  return (cells, row) => {
    const base: CanonicalRow['cells'] = {};
    for (const [c, i] of lotColumns) if (cells[i] !== undefined) base[c] = cells[i];
    const replicateCounter = new Map<string, number>();
    const out: CanonicalRow[] = [];
    for (const { headerName, code, index } of valueColumns) {
      const cell = index === undefined ? undefined : cells[index];
      if (cell === undefined || cell.trim() === '') continue;
      const replicate = (replicateCounter.get(code) ?? 0) + 1;
      replicateCounter.set(code, replicate);
      out.push({
        row,
        cells: { ...base, characteristic: code, value: cell, replicate: String(replicate) },
        sourceColumn: { ...lotSource, characteristic: headerName, value: headerName, replicate: headerName },
      });
    }
    return out;
  };
}

/** Columns a file lacks for a mapping: named in the 422 before any row is read. */
export function missingColumns(headers: string[], mapping: ColumnMapping): string[] {
  const have = new Set(headers);
  if (mapping.format === 'long') {
    return requiredColumns.filter((c) => !have.has(mapping.columns[c] ?? c)).map((c) => mapping.columns[c] ?? c);
  }
  const needed = (['lot', 'product', 'line', 'produced_at'] as const).map((c) => mapping.columns[c] ?? c);
  return [...needed, ...Object.keys(mapping.characteristicColumns)].filter((h) => !have.has(h));
}
