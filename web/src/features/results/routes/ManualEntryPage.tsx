import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { useFieldArray, useForm, useWatch, type FieldPath } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { ManualEntryInput } from '@shared/ingest';
import { readPlantDateTime, type PlantClock } from '@shared/time';
import { ApiError, errorMessage } from '@web/lib/http';
import { useEntryCatalogue, usePlantClock, type EntryCatalogue } from '@web/lib/catalogue';
import { lotPath, useSaveManualEntry } from '@web/lib/lots';
import { ManualResultCard } from '../components/ManualResultCard';
import { manualEntryFormSchema, plantDateTimeHint } from '../lib/entry-form';
import { characteristicLabel } from '@web/lib/names';
import { blankAsUndefined } from '@web/lib/form-values';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Card } from '@web/components/ui/Card';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { Field, Input, Select } from '@web/components/ui/Field';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';

export default function ManualEntryPage() {
  const catalogue = useEntryCatalogue();
  const clock = usePlantClock();
  return (
    <>
      <PageHeader
        title="Enter a lot by hand"
        description="Type the results of one lot. Strengths may be entered as the press's breaking loads: they are converted by the method's formula, shown before saving and stored as results."
      />
      {catalogue.error ? (
        <ErrorState title="Could not load the products and characteristics" error={catalogue.error} onRetry={catalogue.retry} />
      ) : !catalogue.data || !clock.data ? (
        <Loading label="Loading products and characteristics…" />
      ) : (
        <>
          <p className="-mt-3 mb-5 text-sm text-zinc-600">
            Type dates and times as {plantDateTimeHint(clock.data)}, on the plant's clock.
          </p>
          <ManualEntryForm catalogue={catalogue.data} clock={clock.data} />
        </>
      )}
    </>
  );
}

const lotFields = new Set(['lot', 'product', 'line', 'producedAt', 'shift', 'operator']);

/** The form field a detail of the API's refusal names, if it names one. */
function fieldFor(path: string): FieldPath<ManualEntryInput> | null {
  return lotFields.has(path) || /^results\.\d+\.(characteristic|testedAt|note|replicates\.\d+)$/.test(path) ? (path as FieldPath<ManualEntryInput>) : null;
}

const emptyEntry: ManualEntryInput = { lot: '', product: '', line: '', producedAt: '', results: [] };

function ManualEntryForm({ catalogue, clock }: { catalogue: EntryCatalogue; clock: PlantClock }) {
  const save = useSaveManualEntry();
  const [saved, setSaved] = useState<{ lot: string; rows: number } | null>(null);
  const [serverErrors, setServerErrors] = useState<string[]>([]);
  const [adding, setAdding] = useState('');
  const {
    control,
    register,
    handleSubmit,
    setError,
    setValue,
    reset,
    getValues,
    formState: { errors },
  } = useForm({ resolver: zodResolver(useMemo(() => manualEntryFormSchema(clock), [clock])), defaultValues: emptyEntry });
  const results = useFieldArray({ control, name: 'results' });
  const productCode = useWatch({ control, name: 'product' });
  const producedAt = useWatch({ control, name: 'producedAt' });
  const producedAtMs = producedAt ? (readPlantDateTime(producedAt, clock)?.getTime() ?? null) : null;

  const products = catalogue.products.filter((p) => p.active);
  const activeLines = catalogue.lines.filter((l) => l.active);
  const ofProduct = useMemo(() => catalogue.characteristics.filter((c) => c.active && c.productCode === productCode), [catalogue, productCode]);
  const added = new Set(results.fields.map((f) => f.characteristic));
  const addable = ofProduct.filter((c) => !added.has(c.code));
  const byCode = new Map(catalogue.characteristics.map((c) => [c.code, c]));
  const methods = new Map(catalogue.testMethods.map((m) => [m.code, m]));
  const readingCount = results.fields.reduce((sum, f) => sum + (byCode.get(f.characteristic)?.subgroupSize ?? 0), 0);

  const chooseProduct = (code: string) => {
    const product = products.find((p) => p.code === code);
    if (product?.lineCode && activeLines.some((l) => l.code === product.lineCode)) setValue('line', product.lineCode);
    // Characteristics belong to one product; those of the previous one no longer apply.
    results.replace([]);
    setAdding('');
  };

  const addCharacteristic = () => {
    const c = byCode.get(adding);
    if (!c) return;
    results.append({
      characteristic: c.code,
      entryUnit: c.rawLoad ? 'kN' : 'result',
      pullHead: c.rawLoad === 'pull-off' ? (c.productFamily === 'tile-adhesive' ? 'square50' : 'round50') : undefined,
      replicates: [],
    });
    setAdding('');
  };

  const onSubmit = handleSubmit((entry) => {
    setSaved(null);
    setServerErrors([]);
    // A subgroup is the characteristic's full set of readings; readings left blank at the end never reach the values.
    const blank = entry.results.flatMap((result, i) => {
      const size = byCode.get(result.characteristic)?.subgroupSize ?? 0;
      return Array.from({ length: Math.max(0, size - result.replicates.length) }, (_, k) => `results.${i}.replicates.${result.replicates.length + k}` as const);
    });
    if (blank.length > 0) {
      blank.forEach((field, i) => setError(field, { message: 'Enter a number' }, { shouldFocus: i === 0 }));
      return;
    }
    save.mutate(entry, {
      onSuccess: (outcome) => {
        setSaved({ lot: entry.lot, rows: outcome.rowsImported });
        // The next lot is usually of the same product, line, shift and operator.
        reset({ ...getValues(), lot: '', results: [] });
      },
      onError: (error) => {
        const details = error instanceof ApiError ? error.details : [];
        // Each message under its field; those that belong to no single field above the save button.
        const unplaced = details.filter((d) => {
          const field = fieldFor(d.path);
          if (field) setError(field, { message: d.message });
          return !field;
        });
        if (unplaced.length > 0 || details.length === 0) setServerErrors(details.length === 0 ? [errorMessage(error)] : unplaced.map((d) => d.message));
      },
    });
  });

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-5" aria-label="Results of one lot">
      {saved && (
        <Alert tone="success">
          Saved: <span className="font-mono">{saved.rows}</span> results of lot{' '}
          <Link to={lotPath(saved.lot)} className="font-medium underline underline-offset-2">
            {saved.lot}
          </Link>
          . The form is ready for the next lot.
        </Alert>
      )}

      <Card title="The lot">
        {/* The middle column is wider so that a line's full name fits its select at 1366 px. */}
        <div className="grid gap-x-5 gap-y-4 sm:grid-cols-2 xl:grid-cols-[minmax(0,1fr)_minmax(0,1.3fr)_minmax(0,1fr)]">
          <Field label="Product" error={errors.product?.message} hint="Changing the product clears the characteristics below.">
            {(ids) => (
              <Select {...ids} {...register('product', { onChange: (event) => chooseProduct(event.target.value) })}>
                <option value="">Choose a product…</option>
                {products.map((p) => (
                  <option key={p.code} value={p.code}>
                    {p.name} ({p.code})
                  </option>
                ))}
              </Select>
            )}
          </Field>
          <Field label="Production line" error={errors.line?.message}>
            {(ids) => (
              <Select {...ids} {...register('line')}>
                <option value="">Choose a line…</option>
                {activeLines.map((l) => (
                  <option key={l.code} value={l.code}>
                    {l.code} · {l.name}
                  </option>
                ))}
              </Select>
            )}
          </Field>
          <Field label="Lot number" error={errors.lot?.message} hint="As printed on the bag or silo ticket.">
            {(ids) => <Input {...ids} autoComplete="off" className="font-mono" {...register('lot')} />}
          </Field>
          <Field label="Production time" error={errors.producedAt?.message} hint={`${plantDateTimeHint(clock)}. Results belong to when the lot was made, not when it was tested.`}>
            {(ids) => <Input {...ids} autoComplete="off" inputMode="numeric" placeholder={plantDateTimeHint(clock)} className="font-mono" {...register('producedAt')} />}
          </Field>
          <Field label="Shift (optional)" error={errors.shift?.message}>
            {(ids) => (
              <Select {...ids} {...register('shift', { setValueAs: blankAsUndefined })}>
                <option value="">—</option>
                <option value="early">Early</option>
                <option value="late">Late</option>
                <option value="night">Night</option>
              </Select>
            )}
          </Field>
          <Field label="Operator (optional)" error={errors.operator?.message} hint="Who ran the tests; initials are fine.">
            {(ids) => <Input {...ids} autoComplete="off" {...register('operator', { setValueAs: blankAsUndefined })} />}
          </Field>
        </div>
      </Card>

      <section aria-label="Characteristics of the lot" className="space-y-4">
        {results.fields.map((field, index) => {
          const c = byCode.get(field.characteristic);
          return c ? (
            <ManualResultCard
              key={field.id}
              index={index}
              characteristic={c}
              producedAtMs={producedAtMs}
              dateTimeHint={plantDateTimeHint(clock)}
              method={methods.get(c.testMethodCode)}
              control={control}
              register={register}
              errors={errors.results}
              onRemove={() => results.remove(index)}
            />
          ) : null;
        })}
        {errors.results?.root?.message || errors.results?.message ? <Alert tone="error">{errors.results.root?.message ?? errors.results.message}</Alert> : null}
        <div className="flex flex-wrap items-end gap-3 rounded-lg border border-dashed border-zinc-300 bg-white px-5 py-4">
          <Field label="Add a characteristic" className="w-full max-w-md" hint={productCode ? undefined : 'Choose the product first.'}>
            {(ids) => (
              <Select {...ids} value={adding} onChange={(event) => setAdding(event.target.value)} disabled={!productCode || addable.length === 0}>
                <option value="">{addable.length === 0 && productCode ? 'All characteristics added' : 'Choose a characteristic…'}</option>
                {addable.map((c) => (
                  <option key={c.code} value={c.code}>
                    {c.code} · {characteristicLabel(c)}
                  </option>
                ))}
              </Select>
            )}
          </Field>
          <Button variant="secondary" onClick={addCharacteristic} disabled={!adding}>
            Add
          </Button>
        </div>
      </section>

      {serverErrors.length > 0 && (
        <Alert tone="error">
          <p className="font-semibold">Nothing was saved.</p>
          <ul className="mt-1 list-disc pl-5">
            {serverErrors.map((message) => (
              <li key={message}>{message}</li>
            ))}
          </ul>
        </Alert>
      )}
      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" busy={save.isPending} disabled={results.fields.length === 0}>
          {readingCount > 0 ? `Save ${readingCount} results` : 'Save the results'}
        </Button>
        <p className="text-sm text-zinc-600">All results of the lot are saved together, or none.</p>
      </div>
    </form>
  );
}
