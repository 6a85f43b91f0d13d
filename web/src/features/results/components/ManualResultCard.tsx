import { useId } from 'react';
import { useWatch, type Control, type FieldErrors, type UseFormRegister } from 'react-hook-form';
import type { ManualEntry, ManualEntryInput } from '@shared/ingest';
import type { Characteristic } from '@web/lib/catalogue';
import type { TestMethodEntry } from '@web/lib/test-methods';
import { MethodCautions } from '@web/components/MethodCautions';
import { pullHeads, readingResult, readingWord } from '../lib/readings';
import { blankAsUndefined, typedNumber } from '@web/lib/form-values';
import { setResult, setStatusText } from '../lib/sets';
import { isOutOfSpec, specAt, specVerdict } from '@shared/spc';
import { specLimitsText, specVerdictBadge } from '@web/lib/spec';
import { useSpecRevisions } from '@web/lib/specifications';
import { Badge } from '@web/components/ui/Badge';
import { Button } from '@web/components/ui/Button';
import { Field, Input, Select } from '@web/components/ui/Field';
import { cx } from '@web/components/ui/cx';
import { formatQuantity } from '@shared/figures';

interface ManualResultCardProps {
  index: number;
  characteristic: Characteristic;
  /** The lot's production time, once typed: it picks the specification revision that judges the readings. */
  producedAtMs: number | null;
  /** How the plant types a date and time, e.g. "dd/mm/yyyy hh:mm". */
  dateTimeHint: string;
  method: TestMethodEntry | undefined;
  control: Control<ManualEntryInput, unknown, ManualEntry>;
  register: UseFormRegister<ManualEntryInput>;
  errors: FieldErrors<ManualEntryInput>['results'];
  onRemove: () => void;
}

const loadWords: Record<NonNullable<Characteristic['rawLoad']>, string> = {
  flexural: 'Breaking loads',
  compressive: 'Breaking loads',
  'pull-off': 'Pull-off forces',
};

/** One characteristic of the lot: its readings, what they give, the verdict against the specification, and the method's cautions. */
export function ManualResultCard({ index, characteristic, producedAtMs, dateTimeHint, method, control, register, errors, onRemove }: ManualResultCardProps) {
  const headingId = useId();
  const revisions = useSpecRevisions(characteristic.id);
  // The lot page judges a lot by the revision in force when it was made; the form shows the same verdict.
  const spec = producedAtMs === null || !revisions.data ? characteristic.spec : specAt(revisions.data, producedAtMs);
  const c: Characteristic = { ...characteristic, spec };
  const earlierRevision = (spec?.revision ?? null) !== (characteristic.spec?.revision ?? null);
  const entry = useWatch({ control, name: `results.${index}` });
  const fieldErrors = errors?.[index];
  const entryUnit = entry?.entryUnit ?? 'result';
  const readings = Array.from({ length: c.subgroupSize }, (_, r) => readingResult(c, entry ?? {}, entry?.replicates?.[r]));
  const values = readings.flatMap((r) => (r.kind === 'result' ? [r.value] : []));
  const complete = values.length === c.subgroupSize;
  const set = complete ? setResult(c, values) : null;
  const word = readingWord(c);

  return (
    <section aria-labelledby={headingId} className="grid gap-4 rounded-lg border border-zinc-200 bg-white p-5 shadow-xs xl:grid-cols-[minmax(0,1fr)_22rem]">
      <div className="space-y-4">
        <header className="flex flex-wrap items-start justify-between gap-3">
          <div>
            <h3 id={headingId} className="text-lg font-semibold text-zinc-900">
              {c.name}
            </h3>
            <p className="text-sm text-zinc-600">
              <span className="font-mono">{c.code}</span> · {c.testMethodName} · {c.standard} · specification:{' '}
              {earlierRevision && !spec ? (
                'none was in force when the lot was made'
              ) : (
                <>
                  <span className="font-mono">{specLimitsText(spec, c.unit, c.decimals)}</span>
                  {earlierRevision && ` (revision ${spec!.revision}, in force when the lot was made)`}
                </>
              )}
            </p>
          </div>
          <Button variant="quiet" size="sm" onClick={onRemove}>
            Remove {c.code}
          </Button>
        </header>

        {c.rawLoad && (
          <fieldset>
            <legend className="mb-1.5 text-sm font-medium text-zinc-800">What you enter</legend>
            <div className="flex flex-wrap gap-x-5 gap-y-2">
              {(['kN', 'N', 'result'] as const).map((unit) => (
                <label key={unit} className="inline-flex items-center gap-2">
                  <input type="radio" value={unit} {...register(`results.${index}.entryUnit`)} className="size-4 accent-accent-700" />
                  {unit === 'result' ? `Results in ${c.unit}` : `${loadWords[c.rawLoad!]} in ${unit}`}
                </label>
              ))}
            </div>
          </fieldset>
        )}
        {c.rawLoad === 'pull-off' && entryUnit !== 'result' && (
          <Field label="Pull head" className="max-w-xs" error={fieldErrors?.pullHead?.message}>
            {(ids) => (
              <Select {...ids} {...register(`results.${index}.pullHead`)}>
                {Object.entries(pullHeads).map(([value, { label }]) => (
                  <option key={value} value={value}>
                    {label}
                  </option>
                ))}
              </Select>
            )}
          </Field>
        )}

        <div className="grid grid-cols-2 gap-3 sm:grid-cols-3 lg:grid-cols-6">
          {readings.map((reading, r) => {
            const error = fieldErrors?.replicates?.[r]?.message ?? (reading.kind === 'error' ? reading.message : undefined);
            return (
              <Field key={r} label={`${word} ${r + 1}`} error={error}>
                {(ids) => (
                  <>
                    <div className="relative">
                      <Input
                        {...ids}
                        inputMode="decimal"
                        autoComplete="off"
                        className={cx('pr-10 font-mono', set?.discardedIndex === r && 'line-through')}
                        {...register(`results.${index}.replicates.${r}`, { setValueAs: typedNumber })}
                      />
                      <span className="pointer-events-none absolute inset-y-0 right-2 flex items-center text-sm text-zinc-500">
                        {entryUnit === 'result' ? c.unit : entryUnit}
                      </span>
                    </div>
                    {reading.kind === 'result' && <ReadingOutcome characteristic={c} value={reading.value} possible={reading.possible} converted={entryUnit !== 'result'} />}
                  </>
                )}
              </Field>
            );
          })}
        </div>

        <div className="rounded-md bg-zinc-50 px-4 py-3" aria-live="polite">
          {set ? (
            <SetSummary characteristic={c} set={set} />
          ) : (
            <p className="text-zinc-600">
              Enter all <span className="font-mono">{c.subgroupSize}</span> readings to see the result of the set.
            </p>
          )}
        </div>

        <div className="grid gap-3 sm:grid-cols-2">
          <Field label="Test time (optional)" hint={`${dateTimeHint}; left empty, the time of saving.`} error={fieldErrors?.testedAt?.message}>
            {(ids) => (
              <Input {...ids} autoComplete="off" inputMode="numeric" placeholder={dateTimeHint} className="font-mono" {...register(`results.${index}.testedAt`, { setValueAs: blankAsUndefined })} />
            )}
          </Field>
          <Field label="Note (optional)" error={fieldErrors?.note?.message}>
            {(ids) => <Input {...ids} autoComplete="off" {...register(`results.${index}.note`, { setValueAs: blankAsUndefined })} />}
          </Field>
        </div>
      </div>
      {method && <MethodCautions cautions={method.cautions} title={`Handling cautions: ${method.name}`} className="self-start" />}
    </section>
  );
}

/** What one reading gives in the characteristic's unit, and whether it is possible and within specification. */
function ReadingOutcome({ characteristic: c, value, possible, converted }: { characteristic: Characteristic; value: number; possible: boolean; converted: boolean }) {
  const outside = isOutOfSpec(specVerdict(value, c.spec));
  const remark = !possible ? 'not possible' : outside ? 'out of spec' : null;
  if (!converted && !remark) return null;
  return (
    <p className={cx('font-mono text-sm', remark ? 'text-red-700' : 'text-zinc-700')}>
      {converted && `= ${formatQuantity(value, c.decimals, c.unit)}`} {remark}
    </p>
  );
}

function SetSummary({ characteristic: c, set }: { characteristic: Characteristic; set: ReturnType<typeof setResult> }) {
  const status = set.status && set.status !== 'accepted' ? setStatusText[set.status] : set.status === 'accepted' && c.testMethodCode === 'RC' ? setStatusText.accepted : null;
  const verdict = set.value === null ? null : specVerdictBadge(set.value, c.spec, c.unit, c.decimals);
  return (
    <div className="space-y-1.5">
      <p className="flex flex-wrap items-center gap-x-3 gap-y-1">
        <span className="font-medium text-zinc-800">Result of the set:</span>
        <span className="font-mono text-lg font-medium" data-testid={`set-result-${c.code}`}>
          {set.value === null ? '—' : formatQuantity(set.value, c.decimals, c.unit)}
        </span>
        {verdict && <Badge tone={verdict.tone}>{verdict.label}</Badge>}
        {status && <Badge tone={status.tone}>{status.label}</Badge>}
      </p>
      <p className="text-sm text-zinc-600">{set.reason}</p>
    </div>
  );
}
