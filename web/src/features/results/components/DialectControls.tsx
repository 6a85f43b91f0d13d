import type { CsvDialect } from '@shared/ingest';
import { Field, Select } from '@web/components/ui/Field';

const delimiterNames: Record<CsvDialect['delimiter'], string> = { ';': 'semicolon', ',': 'comma', '\t': 'tab' };

export function dialectText(dialect: CsvDialect): string {
  return `${delimiterNames[dialect.delimiter]}-separated, ${dialect.decimalComma ? 'decimal comma' : 'decimal point'}`;
}

/** How the file is read, as detected; the person uploading may correct it, and the server then reads it the same way. */
export function DialectControls({ detected, dialect, onChange }: { detected: CsvDialect; dialect: CsvDialect; onChange: (dialect: CsvDialect) => void }) {
  const changed = detected.delimiter !== dialect.delimiter || detected.decimalComma !== dialect.decimalComma;
  return (
    <div className="space-y-3">
      <p className="text-zinc-700" data-testid="detected-dialect">
        Detected: <span className="font-medium text-zinc-900">{dialectText(detected)}</span>
        {changed && <span> — you changed this to {dialectText(dialect)}</span>}
      </p>
      <div className="flex flex-wrap gap-4">
        <Field label="Delimiter" className="w-64">
          {(control) => (
            <Select {...control} value={dialect.delimiter} onChange={(event) => onChange({ ...dialect, delimiter: event.target.value as CsvDialect['delimiter'] })}>
              <option value=";">Semicolon ( ; )</option>
              <option value=",">Comma ( , )</option>
              <option value={'\t'}>Tab</option>
            </Select>
          )}
        </Field>
        <Field label="Decimal mark" className="w-64">
          {(control) => (
            <Select {...control} value={dialect.decimalComma ? 'comma' : 'point'} onChange={(event) => onChange({ ...dialect, decimalComma: event.target.value === 'comma' })}>
              <option value="comma">Decimal comma (12,5)</option>
              <option value="point">Decimal point (12.5)</option>
            </Select>
          )}
        </Field>
      </div>
    </div>
  );
}
