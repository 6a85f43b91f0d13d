import {
  canonicalColumns,
  columnMappingSchema,
  missingColumns,
  requiredColumns,
  wideLotColumns,
  type CanonicalColumn,
  type ColumnMapping,
} from '@shared/ingest';

/** The mapping as it is being edited: a blank choice is a column not picked yet. */
export interface MappingDraft {
  format: 'long' | 'wide';
  /** Canonical column → the file's header. */
  columns: Partial<Record<CanonicalColumn, string>>;
  /** Wide files: the file's header → characteristic code. */
  characteristicColumns: Record<string, string>;
}

/** What each canonical column holds, in the words of the lab. */
export const columnLabels: Record<CanonicalColumn, string> = {
  lot: 'Lot number',
  product: 'Product code',
  line: 'Production line',
  produced_at: 'Production time',
  characteristic: 'Characteristic code',
  value: 'Result',
  shift: 'Shift',
  replicate: 'Replicate number',
  tested_at: 'Test time',
  operator: 'Operator',
  note: 'Note',
};

const requiredWide: readonly CanonicalColumn[] = ['lot', 'product', 'line', 'produced_at'];

export function isRequired(column: CanonicalColumn, format: MappingDraft['format']): boolean {
  return format === 'long' ? (requiredColumns as readonly string[]).includes(column) : requiredWide.includes(column);
}

export const draftColumns = (format: MappingDraft['format']): readonly CanonicalColumn[] => (format === 'long' ? canonicalColumns : wideLotColumns);

/** Whether the file already has the canonical long headers, so no mapping is needed. */
export function hasCanonicalHeaders(headers: string[]): boolean {
  return missingColumns(headers, { format: 'long', columns: {} }).length === 0;
}

const simplify = (text: string) => text.toLowerCase().replace(/[\s_.-]+/g, '');

/** A first guess from the file's headers: same name regardless of case and separators, and result columns named after a characteristic code. */
export function suggestDraft(format: MappingDraft['format'], headers: string[], characteristicCodes: string[]): MappingDraft {
  const columns: MappingDraft['columns'] = {};
  for (const column of draftColumns(format)) {
    const header = headers.find((h) => simplify(h) === simplify(column));
    if (header) columns[column] = header;
  }
  const characteristicColumns: Record<string, string> = {};
  if (format === 'wide') {
    const used = new Set(Object.values(columns));
    for (const header of headers) {
      if (used.has(header)) continue;
      // "HVL25-FLOW", "hvl25 flow_2": a code, optionally followed by a replicate number.
      const bare = simplify(header.replace(/[\s_#-]+\d+$/, ''));
      const code = characteristicCodes.find((c) => simplify(c) === simplify(header) || simplify(c) === bare);
      if (code) characteristicColumns[header] = code;
    }
  }
  return { format, columns, characteristicColumns };
}

export function draftFromMapping(mapping: ColumnMapping): MappingDraft {
  return { format: mapping.format, columns: { ...mapping.columns }, characteristicColumns: mapping.format === 'wide' ? { ...mapping.characteristicColumns } : {} };
}

/** The draft as the shared mapping schema has it, with blank choices left out; errors in the schema's words. */
export function mappingFromDraft(draft: MappingDraft): { mapping: ColumnMapping; error: null } | { mapping: null; error: string } {
  const columns = Object.fromEntries(draftColumns(draft.format).flatMap((c) => (draft.columns[c] ? [[c, draft.columns[c]]] : [])));
  const candidate =
    draft.format === 'long'
      ? { format: 'long', columns }
      : { format: 'wide', columns, characteristicColumns: Object.fromEntries(Object.entries(draft.characteristicColumns).filter(([, code]) => code)) };
  const parsed = columnMappingSchema.safeParse(candidate);
  return parsed.success ? { mapping: parsed.data, error: null } : { mapping: null, error: parsed.error.issues[0]?.message ?? 'The mapping is incomplete' };
}
