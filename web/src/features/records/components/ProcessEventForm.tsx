import { useMemo } from 'react';
import { useForm, useWatch } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { Product, ProductionLine } from '@web/lib/catalogue';
import { TextArea } from '@web/components/ui/TextArea';
import { useCreateProcessEvent } from '../api/process-events';
import { processEventFormSchema } from '../lib/form-schemas';
import type { PlantClock } from '@shared/time';
import { plantDateValue } from '@web/lib/plant-dates';
import { PlantDateField } from '@web/components/PlantDateInput';
import { showServerErrors } from '@web/lib/forms';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { Field, Input, Select } from '@web/components/ui/Field';

const fields = ['occurredAt', 'title', 'description', 'lineCode', 'productCode'] as const;

export interface RecordedEvent {
  title: string;
  occurredAt: string;
  lineCode?: string;
  productCode?: string;
}

const emptyEvent = (clock: PlantClock) => ({ occurredAt: plantDateValue('dateTime', new Date(), clock), title: '', description: '', lineCode: '', productCode: '' });

/** Something that happened at the plant or in the lab, recorded so that a change on a chart can be explained. */
export function ProcessEventForm({
  lines,
  products,
  clock,
  onRecorded,
}: {
  lines: ProductionLine[];
  products: Product[];
  clock: PlantClock;
  onRecorded: (event: RecordedEvent) => void;
}) {
  const create = useCreateProcessEvent();
  const schema = useMemo(() => processEventFormSchema(clock), [clock]);
  const {
    register,
    handleSubmit,
    setError,
    setValue,
    getValues,
    reset,
    control,
    formState: { errors },
  } = useForm({ resolver: zodResolver(schema), defaultValues: emptyEvent(clock) });
  const lineCode = useWatch({ control, name: 'lineCode' });
  const productChoices = lineCode ? products.filter((p) => p.lineCode === lineCode) : products;

  const onSubmit = handleSubmit((input) =>
    create.mutate(input, {
      onSuccess: (saved) => {
        reset(emptyEvent(clock));
        onRecorded({ title: saved.title, occurredAt: saved.occurredAt, lineCode: input.lineCode, productCode: input.productCode });
      },
      onError: (error) => showServerErrors(error, setError, fields),
    }),
  );

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Record an event">
      {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
      <div className="grid gap-4 sm:grid-cols-2">
        <PlantDateField label="When it happened" kind="dateTime" error={errors.occurredAt?.message} {...register('occurredAt')} />
        <Field label="Title" hint="Short, as it will label the chart marker, e.g. “New sand source”." error={errors.title?.message}>
          {(ids) => <Input {...ids} autoComplete="off" maxLength={80} {...register('title')} />}
        </Field>
        <Field label="Production line" error={errors.lineCode?.message}>
          {(ids) => (
            <Select
              {...ids}
              {...register('lineCode', {
                // A product of another line no longer fits the event.
                onChange: (event: { target: { value: string } }) => {
                  const product = products.find((p) => p.code === getValues('productCode'));
                  if (product && event.target.value && product.lineCode !== event.target.value) setValue('productCode', '');
                },
              })}
            >
              <option value="">Whole plant or the lab</option>
              {lines
                .filter((line) => line.active)
                .map((line) => (
                  <option key={line.code} value={line.code}>
                    {line.code} · {line.name}
                  </option>
                ))}
            </Select>
          )}
        </Field>
        <Field label="Product" hint="Only if it concerns one product; its line is taken with it." error={errors.productCode?.message}>
          {(ids) => (
            <Select {...ids} {...register('productCode')}>
              <option value="">{lineCode ? 'Every product of the line' : 'Every product'}</option>
              {productChoices.map((product) => (
                <option key={product.code} value={product.code}>
                  {product.code} · {product.name}
                </option>
              ))}
            </Select>
          )}
        </Field>
      </div>
      <Field label="Description (optional)" hint="What happened, in a sentence or two: supplier certificate, who checked what." error={errors.description?.message}>
        {(ids) => <TextArea {...ids} {...register('description')} />}
      </Field>
      <Button type="submit" busy={create.isPending}>
        Record event
      </Button>
    </form>
  );
}
