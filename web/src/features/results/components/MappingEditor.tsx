import { useState } from 'react';
import { missingColumns, saveMappingSchema, type ColumnMapping } from '@shared/ingest';
import { errorMessage } from '@web/lib/http';
import type { Characteristic } from '@web/lib/catalogue';
import { useSaveColumnMapping, type SavedMapping } from '../api/uploads';
import { characteristicLabel } from '@web/lib/names';
import { columnLabels, draftColumns, draftFromMapping, isRequired, suggestDraft, type MappingDraft } from '../lib/mapping';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { Field, Input, Select } from '@web/components/ui/Field';

interface MappingEditorProps {
  headers: string[];
  draft: MappingDraft;
  onChange: (draft: MappingDraft, savedName?: string) => void;
  /** The mapping built from the draft, or why it cannot be built. */
  mapping: ColumnMapping | null;
  mappingError: string | null;
  characteristics: Characteristic[];
  savedMappings: SavedMapping[];
  savedName: string | undefined;
}

const NONE = '';

/** Says which column of the file holds what, for exports whose headers are not the template's. */
export function MappingEditor({ headers, draft, onChange, mapping, mappingError, characteristics, savedMappings, savedName }: MappingEditorProps) {
  const codes = characteristics.map((c) => c.code);
  const products = [...new Set(characteristics.map((c) => c.productCode))];
  const lotColumnsUsed = new Set(Object.values(draft.columns));
  const missing = mapping ? missingColumns(headers, mapping) : [];

  const setColumn = (column: keyof MappingDraft['columns'], header: string) => onChange({ ...draft, columns: { ...draft.columns, [column]: header || undefined } });
  const setCharacteristic = (header: string, code: string) => onChange({ ...draft, characteristicColumns: { ...draft.characteristicColumns, [header]: code } });

  return (
    <div className="space-y-5">
      <div className="flex flex-wrap items-end gap-4">
        <Field label="Saved mappings" className="w-full max-w-md" hint={savedMappings.length === 0 ? 'None saved yet: save this one below once it fits.' : undefined}>
          {(control) => (
            <Select
              {...control}
              value={savedMappings.find((m) => m.name === savedName)?.id ?? ''}
              disabled={savedMappings.length === 0}
              onChange={(event) => {
                const chosen = savedMappings.find((m) => String(m.id) === event.target.value);
                if (chosen) onChange(draftFromMapping(chosen.mapping), chosen.name);
              }}
            >
              <option value="">Choose a saved mapping…</option>
              {savedMappings.map((m) => (
                <option key={m.id} value={m.id}>
                  {m.name} ({m.mapping.format === 'wide' ? 'one row per lot' : 'one result per row'})
                </option>
              ))}
            </Select>
          )}
        </Field>
        <fieldset>
          <legend className="mb-1.5 text-sm font-medium text-zinc-800">Layout of the file</legend>
          <div className="flex flex-wrap gap-4">
            {(['long', 'wide'] as const).map((format) => (
              <label key={format} className="inline-flex h-10 items-center gap-2">
                <input
                  type="radio"
                  name="mapping-format"
                  value={format}
                  checked={draft.format === format}
                  onChange={() => onChange(suggestDraft(format, headers, codes))}
                  className="size-4 accent-accent-700"
                />
                {format === 'long' ? 'One result per row' : 'One row per lot, a column per result'}
              </label>
            ))}
          </div>
        </fieldset>
      </div>

      <div>
        <h3 className="font-semibold text-zinc-900">{draft.format === 'long' ? 'Columns' : 'Lot columns'}</h3>
        <div className="mt-2 grid gap-x-5 gap-y-3 sm:grid-cols-2 xl:grid-cols-3">
          {draftColumns(draft.format).map((column) => {
            const chosen = draft.columns[column] ?? NONE;
            const required = isRequired(column, draft.format);
            // A choice not made yet is a step still to take, not a mistake: it is named, not marked in red.
            const hint = required && !chosen ? `Choose the column that holds the ${columnLabels[column].toLowerCase()}` : undefined;
            const error = chosen && missing.includes(chosen) ? `The file has no column “${chosen}”` : undefined;
            return (
              <Field key={column} label={`${columnLabels[column]}${required ? '' : ' (optional)'}`} hint={hint} error={error}>
                {(control) => (
                  <Select {...control} value={headers.includes(chosen) ? chosen : NONE} onChange={(event) => setColumn(column, event.target.value)}>
                    <option value={NONE}>{required ? 'Choose a column…' : '— not in the file —'}</option>
                    {headers.map((header) => (
                      <option key={header} value={header}>
                        {header}
                      </option>
                    ))}
                  </Select>
                )}
              </Field>
            );
          })}
        </div>
      </div>

      {draft.format === 'wide' && (
        <div>
          <h3 className="font-semibold text-zinc-900">Result columns</h3>
          <p className="text-sm text-zinc-600">Pick the characteristic each column holds. Several columns may hold one characteristic: they become its replicates, left to right.</p>
          <div className="mt-2 grid gap-x-5 gap-y-3 sm:grid-cols-2 xl:grid-cols-3">
            {headers
              .filter((header) => !lotColumnsUsed.has(header))
              .map((header) => (
                <Field key={header} label={header}>
                  {(control) => (
                    <Select {...control} value={draft.characteristicColumns[header] ?? NONE} onChange={(event) => setCharacteristic(header, event.target.value)}>
                      <option value={NONE}>— not a result —</option>
                      {products.map((product) => (
                        <optgroup key={product} label={product}>
                          {characteristics
                            .filter((c) => c.productCode === product)
                            .map((c) => (
                              <option key={c.code} value={c.code}>
                                {c.code} · {characteristicLabel(c)}
                              </option>
                            ))}
                        </optgroup>
                      ))}
                    </Select>
                  )}
                </Field>
              ))}
          </div>
        </div>
      )}

      {mappingError && <Alert tone="error">{mappingError}</Alert>}
      {mapping && missing.length === 0 && <SaveMapping mapping={mapping} savedName={savedName} onSaved={(name) => onChange(draft, name)} />}
    </div>
  );
}

function SaveMapping({ mapping, savedName, onSaved }: { mapping: ColumnMapping; savedName: string | undefined; onSaved: (name: string) => void }) {
  const save = useSaveColumnMapping();
  const [name, setName] = useState('');
  const [error, setError] = useState<string | null>(null);

  if (savedName) return <p role="status" className="text-sm text-zinc-700">Using the saved mapping “{savedName}”.</p>;
  return (
    <form
      className="flex flex-wrap items-end gap-3"
      aria-label="Save this mapping"
      onSubmit={(event) => {
        event.preventDefault();
        const input = saveMappingSchema.safeParse({ name, mapping });
        if (!input.success) return setError(input.error.issues[0]?.message ?? 'Give the mapping a name');
        setError(null);
        save.mutate(input.data, { onSuccess: (result) => onSaved(result.name), onError: (err) => setError(errorMessage(err)) });
      }}
    >
      <Field label="Save this mapping as" className="w-80" hint="For the next file of this kind, e.g. “Press export (one row per lot)”." error={error ?? undefined}>
        {(control) => <Input {...control} value={name} onChange={(event) => setName(event.target.value)} autoComplete="off" />}
      </Field>
      <Button type="submit" variant="secondary" busy={save.isPending}>
        Save mapping
      </Button>
    </form>
  );
}
