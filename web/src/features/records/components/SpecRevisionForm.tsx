import { useMemo } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { Characteristic } from '@web/lib/catalogue';
import { TextArea } from '@web/components/ui/TextArea';
import { useCreateSpecRevision, type SpecRevision } from '@web/lib/specifications';
import { specRevisionFormSchema } from '../lib/form-schemas';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { PlantDateField } from '@web/components/PlantDateInput';
import { showServerErrors } from '@web/lib/forms';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { Field, Input } from '@web/components/ui/Field';

const fields = ['lsl', 'usl', 'target', 'effectiveFrom', 'reason'] as const;

const typedLimit = (value: number | null | undefined) => (value == null ? '' : String(value));

/**
 * A new revision, starting from the latest one's limits since a revision usually moves one of them.
 * The parent gives it a key per latest revision, so a saved revision brings fresh starting values.
 */
export function SpecRevisionForm({
  characteristic,
  latest,
  clock,
  onSaved,
}: {
  characteristic: Characteristic;
  latest: SpecRevision | undefined;
  clock: PlantClock;
  onSaved: (revision: SpecRevision) => void;
}) {
  const create = useCreateSpecRevision(characteristic.id);
  const schema = useMemo(() => specRevisionFormSchema(clock), [clock]);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm({
    resolver: zodResolver(schema),
    defaultValues: { lsl: typedLimit(latest?.lsl), usl: typedLimit(latest?.usl), target: typedLimit(latest?.target), effectiveFrom: '', reason: '' },
  });

  // The saved revision remounts this form with fresh starting values before mutate's own callbacks
  // could run, so the outcome is taken from the promise.
  const onSubmit = handleSubmit(async (input) => {
    try {
      onSaved(await create.mutateAsync(input));
    } catch (error) {
      showServerErrors(error, setError, fields);
    }
  });

  const unit = characteristic.unit;
  const limitInput = (name: 'lsl' | 'usl' | 'target') => (control: { id: string; describedBy: string | undefined; invalid: boolean }) => (
    <Input {...control} inputMode="decimal" autoComplete="off" className="font-mono" {...register(name)} />
  );

  return (
    <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Add a revision">
      {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
      <div className="grid gap-4 sm:grid-cols-3">
        <Field label={`LSL (${unit})`} hint="Lower specification limit; empty for none." error={errors.lsl?.message}>
          {limitInput('lsl')}
        </Field>
        <Field label={`Target (${unit})`} hint="Optional." error={errors.target?.message}>
          {limitInput('target')}
        </Field>
        <Field label={`USL (${unit})`} hint="Upper specification limit; empty for none." error={errors.usl?.message}>
          {limitInput('usl')}
        </Field>
      </div>
      <PlantDateField
        label="Effective from (optional)"
        kind="dateTime"
        hint={`Empty: from now.${latest ? ` Not before revision ${latest.revision}, in force from ${formatPlantDateTime(latest.effectiveFrom, clock)}.` : ''}`}
        error={errors.effectiveFrom?.message}
        className="max-w-sm"
        {...register('effectiveFrom')}
      />
      <Field label="Reason" hint="Kept with the revision and in the audit trail, e.g. “Limit agreed with the customer for the new data sheet”." error={errors.reason?.message}>
        {(control) => <TextArea {...control} {...register('reason')} />}
      </Field>
      <Button type="submit" busy={create.isPending}>
        Save revision {(latest?.revision ?? 0) + 1}
      </Button>
    </form>
  );
}
