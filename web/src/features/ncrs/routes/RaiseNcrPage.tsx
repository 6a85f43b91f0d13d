import { useMemo } from 'react';
import { useQuery } from '@tanstack/react-query';
import { Link, useNavigate, useSearchParams } from 'react-router-dom';
import { useFieldArray, useForm, type Path } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { ncrSeverities } from '@shared/schemas/ncrs';
import type { AlarmView } from '@shared/schemas/alarms';
import { useRaiseNcr } from '../api/ncrs';
import { useSourceAlarms } from '../api/sources';
import { alarmIdsOf, prefillFromAlarms } from '../lib/raise-prefill';
import { raiseFormSchema, type RaiseForm } from '../lib/form-schemas';
import { severityHints, severityWords } from '../lib/words';
import { useMay } from '@web/app/permissions';
import { useProducts, type Product } from '@web/lib/catalogue';
import { lotPath, lotQueryOptions } from '@web/lib/lots';
import { usePeople } from '@web/lib/people';
import { showServerErrors } from '@web/lib/forms';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Field, Input, Select } from '@web/components/ui/Field';
import { TextArea } from '@web/components/ui/TextArea';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';

/** /ncrs/new, /ncrs/new?alarms=1,2,3 or /ncrs/new?lot=L1-2611-01: raise an NCR, from alarms, from a lot, or directly. */
export default function RaiseNcrPage() {
  const [params] = useSearchParams();
  const alarmIds = useMemo(() => alarmIdsOf(params.get('alarms')), [params]);
  const lotNumber = params.get('lot')?.trim() ?? '';
  const alarms = useSourceAlarms(alarmIds);
  const lot = useQuery({ ...lotQueryOptions(lotNumber), enabled: lotNumber !== '' });
  const products = useProducts();

  const failed = alarms.find((q) => q.isError) ?? (lotNumber && lot.isError ? lot : undefined) ?? (products.isError ? products : undefined);
  const ready = alarms.every((q) => q.data) && (!lotNumber || lot.data) && products.data;

  let body;
  if (failed) body = <ErrorState title="Could not load what the NCR is raised from" error={failed.error} />;
  else if (!ready) body = <Loading />;
  else {
    const sourceAlarms = alarms.map((q) => q.data!);
    const prefill = prefillFromAlarms(sourceAlarms);
    const productCode = lot.data?.productCode ?? prefill.productCode;
    const defaults: RaiseForm = {
      title: prefill.title || (lot.data ? `Lot ${lot.data.lotNumber} of ${lot.data.productCode}: ` : ''),
      description: '',
      severity: '',
      productId: String(products.data!.find((p) => p.code === productCode)?.id ?? ''),
      lots: (lot.data ? [lot.data.lotNumber] : prefill.lotNumbers).map((n) => ({ lotNumber: n, quantityT: '' })),
      holdLots: true,
      assigneeId: '',
    };
    body = <RaiseNcrForm defaults={defaults} alarms={sourceAlarms} products={products.data!} />;
  }

  return (
    <>
      <PageHeader
        title="Raise an NCR"
        description={
          alarmIds.length > 0
            ? 'From the alarms below: their product and lots are filled in; read and complete the rest.'
            : lotNumber
              ? `From lot ${lotNumber}.`
              : 'Say what is wrong, which lots it concerns and whether they must be held now.'
        }
      />
      {body}
    </>
  );
}

function RaiseNcrForm({ defaults, alarms, products }: { defaults: RaiseForm; alarms: AlarmView[]; products: Product[] }) {
  const navigate = useNavigate();
  const raise = useRaiseNcr();
  const people = usePeople();
  const mayAssign = useMay('ncr.manage');
  const {
    register,
    handleSubmit,
    setError,
    control,
    watch,
    formState: { errors },
  } = useForm<RaiseForm, unknown, ReturnType<typeof raiseFormSchema.parse>>({ resolver: zodResolver(raiseFormSchema), defaultValues: defaults });
  const lots = useFieldArray({ control, name: 'lots' });
  const hasLots = watch('lots').some((l) => l.lotNumber.trim() !== '');

  const fields: Path<RaiseForm>[] = ['title', 'description', 'severity', 'productId', 'assigneeId', 'holdLots', ...lots.fields.flatMap((_, i) => [`lots.${i}.lotNumber`, `lots.${i}.quantityT`] as const)];
  const onSubmit = handleSubmit((input) =>
    raise.mutate(
      { ...input, alarmIds: alarms.length ? alarms.map((a) => a.id) : undefined },
      { onSuccess: (ncr) => navigate(`/ncrs/${ncr.id}`), onError: (error) => showServerErrors(error, setError, fields) },
    ),
  );

  return (
    <form onSubmit={onSubmit} noValidate className="max-w-3xl space-y-5" aria-label="Raise an NCR">
      {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
      {alarms.length > 0 && (
        <section aria-label="Alarms it is raised from" className="rounded-lg border border-zinc-200 bg-white px-4 py-3">
          <h2 className="font-semibold">Raised from {alarms.length === 1 ? 'this alarm' : `these ${alarms.length} alarms`}</h2>
          <ul className="mt-2 space-y-1 text-sm">
            {alarms.map((a) => (
              <li key={a.id}>
                <span className="font-mono">{a.characteristic.code}</span>, lot <span className="font-mono">{a.lot.lotNumber}</span>: {a.description}
              </li>
            ))}
          </ul>
        </section>
      )}
      <Field label="Title" hint="What is wrong, in a line, e.g. “Flow below specification on three lots”." error={errors.title?.message}>
        {(ids) => <Input {...ids} autoComplete="off" maxLength={200} {...register('title')} />}
      </Field>
      <Field label="Description" hint="What was found, where and when, and who found it." error={errors.description?.message}>
        {(ids) => <TextArea {...ids} rows={5} maxLength={5000} {...register('description')} />}
      </Field>
      <div className="grid gap-4 sm:grid-cols-2">
        <Field label="Severity" error={errors.severity?.message} hint="Minor: a record or procedure; major: product contained at the plant; critical: product may have left.">
          {(ids) => (
            <Select {...ids} {...register('severity')}>
              <option value="">Choose…</option>
              {ncrSeverities.map((s) => (
                <option key={s} value={s} title={severityHints[s]}>
                  {severityWords[s]}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="Product" hint="Empty: taken from the lots." error={errors.productId?.message}>
          {(ids) => (
            <Select {...ids} {...register('productId')}>
              <option value="">From the lots</option>
              {products.map((p) => (
                <option key={p.id} value={p.id}>
                  {p.code} · {p.name}
                </option>
              ))}
            </Select>
          )}
        </Field>
        {mayAssign && (
          <Field label="Assignee" hint="Who follows it up." error={errors.assigneeId?.message}>
            {(ids) => (
              <Select {...ids} {...register('assigneeId')}>
                <option value="">Nobody yet</option>
                {(people.data ?? []).map((p) => (
                  <option key={p.id} value={p.id}>
                    {p.name}
                  </option>
                ))}
              </Select>
            )}
          </Field>
        )}
      </div>
      <fieldset className="space-y-3 rounded-lg border border-zinc-200 bg-white px-4 py-3">
        <legend className="px-1 font-semibold">Lots concerned</legend>
        {lots.fields.length === 0 && <p className="text-sm text-zinc-600">No lot yet. Add the lots the nonconformance concerns, if any.</p>}
        {lots.fields.map((f, i) => (
          <div key={f.id} className="flex flex-wrap items-start gap-3" data-lot-row={i}>
            <Field label="Lot number" className="w-56" error={errors.lots?.[i]?.lotNumber?.message}>
              {(ids) => <Input {...ids} className="font-mono" autoComplete="off" maxLength={64} {...register(`lots.${i}.lotNumber`)} />}
            </Field>
            <Field label="Quantity (t)" className="w-36" hint="Empty: not known yet." error={errors.lots?.[i]?.quantityT?.message}>
              {(ids) => <Input {...ids} inputMode="decimal" className="font-mono" autoComplete="off" {...register(`lots.${i}.quantityT`)} />}
            </Field>
            <Button variant="quiet" size="sm" className="mt-8" onClick={() => lots.remove(i)} aria-label={`Remove lot ${i + 1}`}>
              Remove
            </Button>
            {f.lotNumber && (
              <Link className="mt-9 text-sm text-accent-800 underline" to={lotPath(f.lotNumber)}>
                Lot page
              </Link>
            )}
          </div>
        ))}
        <Button variant="secondary" size="sm" onClick={() => lots.append({ lotNumber: '', quantityT: '' })} disabled={lots.fields.length >= 100}>
          Add a lot
        </Button>
        {hasLots && (
          <label className="flex items-start gap-2">
            <input type="checkbox" className="mt-1 size-4" {...register('holdLots')} />
            <span>
              <span className="font-medium">Put these lots on hold now</span>
              <span className="block text-sm text-zinc-600">Containment: no lot listed is dispatched until the NCR decides on it. A lot already on hold stays so.</span>
            </span>
          </label>
        )}
      </fieldset>
      <div className="flex gap-2">
        <Button type="submit" busy={raise.isPending}>
          Raise NCR
        </Button>
        <Link to="/ncrs" className="inline-flex h-10 items-center rounded-md border border-zinc-300 bg-white px-4 font-medium text-zinc-800 hover:bg-zinc-100">
          Cancel
        </Link>
      </div>
    </form>
  );
}
