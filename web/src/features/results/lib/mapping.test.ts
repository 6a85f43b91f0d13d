import { describe, expect, it } from 'vitest';
import { missingColumns, rowMapper } from '@shared/ingest';
import { hasCanonicalHeaders, mappingFromDraft, suggestDraft } from './mapping';

const codes = ['HVL25-FLOW', 'HVL25-AIR', 'HVL25-RC28'];

describe('column mapping of the upload page', () => {
  it('needs no mapping for the template headers, in any order, and one when a required column is named otherwise', () => {
    expect(hasCanonicalHeaders(['value', 'lot', 'product', 'line', 'produced_at', 'characteristic', 'note'])).toBe(true);
    expect(hasCanonicalHeaders(['Lot', 'product', 'line', 'produced_at', 'characteristic', 'value'])).toBe(false);
  });

  it('guesses long columns by name regardless of case and separators', () => {
    const draft = suggestDraft('long', ['LOT', 'Product', 'line', 'Produced At', 'Characteristic', 'Value', 'Tested-At'], codes);
    expect(draft.columns).toEqual({ lot: 'LOT', product: 'Product', line: 'line', produced_at: 'Produced At', characteristic: 'Characteristic', value: 'Value', tested_at: 'Tested-At' });
    const built = mappingFromDraft(draft);
    expect(built.error).toBeNull();
    expect(missingColumns(['LOT', 'Product', 'line', 'Produced At', 'Characteristic', 'Value', 'Tested-At'], built.mapping!)).toEqual([]);
  });

  it('guesses result columns of a wide file from characteristic codes, with a replicate number after a separator', () => {
    const headers = ['lot', 'product', 'line', 'produced_at', 'HVL25-FLOW 1', 'hvl25_flow_2', 'HVL25-RC28', 'Remark'];
    const draft = suggestDraft('wide', headers, codes);
    // "HVL25-RC28" ends in digits that belong to the code, not a replicate.
    expect(draft.characteristicColumns).toEqual({ 'HVL25-FLOW 1': 'HVL25-FLOW', hvl25_flow_2: 'HVL25-FLOW', 'HVL25-RC28': 'HVL25-RC28' });
    const { mapping } = mappingFromDraft(draft);
    const rows = rowMapper(headers, mapping!)(['A1', 'HVL25', 'L1', '2026-11-30T06:00', '145', '147', '', 'x'], 2);
    expect(rows.map((r) => [r.cells.characteristic, r.cells.replicate, r.cells.value])).toEqual([
      ['HVL25-FLOW', '1', '145'],
      ['HVL25-FLOW', '2', '147'],
    ]);
  });

  it('leaves blank choices out and reports what the shared schema refuses', () => {
    const wideWithoutResults = mappingFromDraft({ format: 'wide', columns: { lot: 'Batch', shift: '' }, characteristicColumns: { 'Flow A': '' } });
    expect(wideWithoutResults).toEqual({ mapping: null, error: 'Map at least one column to a characteristic' });
    const long = mappingFromDraft({ format: 'long', columns: { lot: 'Batch', note: '' }, characteristicColumns: {} });
    expect(long.mapping).toEqual({ format: 'long', columns: { lot: 'Batch' } });
  });
});
