import { useState } from 'react';
import { useQuery } from '@tanstack/react-query';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { formatPlantDate, formatPlantDateTime, PLANT_DATE_FORMATS, zoneAbbreviation } from '@shared/time';
import { updatePlantSchema } from '@shared/schemas/plants';
import { capabilityThreshold } from '@shared/schemas/catalogue';
import { plantsQueryOptions, type Plant } from '@web/lib/catalogue';
import { showServerErrors } from '@web/lib/forms';
import { useUpdatePlant } from '../api/catalogue';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Card } from '@web/components/ui/Card';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { Field, Input, Select } from '@web/components/ui/Field';
import { typedNumber } from '@web/lib/form-values';
import { formatFigure } from '@shared/figures';
import { z } from 'zod';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';

// A day whose day and month cannot be mistaken for each other shows what each format looks like.
const sampleDay = '2026-11-30T12:00:00Z';

/** /admin/plant: the plant's date format (every page shows and takes dates in it) beside its time zone. */
export default function PlantSettingsPage() {
  const plants = useQuery(plantsQueryOptions());
  return (
    <>
      <PageHeader
        title="Plant settings"
        description="Every page shows times on the plant's clock and takes dates in its date format, whatever the zone or language of the computer in use."
      />
      {plants.isPending ? (
        <Loading label="Loading the plant…" />
      ) : plants.isError ? (
        <ErrorState title="Could not load the plant" error={plants.error} onRetry={() => plants.refetch()} />
      ) : (
        <div className="space-y-6">
          {plants.data.map((plant) => (
            <PlantCard key={plant.id} plant={plant} />
          ))}
        </div>
      )}
    </>
  );
}

function PlantCard({ plant }: { plant: Plant }) {
  const update = useUpdatePlant();
  const [saved, setSaved] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm({ resolver: zodResolver(updatePlantSchema), defaultValues: { dateFormat: plant.dateFormat } });

  const onSubmit = handleSubmit(async (input) => {
    setSaved(null);
    try {
      const after = await update.mutateAsync({ id: plant.id, changes: input });
      setSaved(`Dates are now written ${after.dateFormat.toLowerCase()}, e.g. ${formatPlantDate(sampleDay, after)}. The change is in the audit trail.`);
    } catch (error) {
      showServerErrors(error, setError, ['dateFormat']);
    }
  });

  return (
    <Card title={`${plant.name} (${plant.code})`}>
      <dl className="mb-5 grid gap-x-6 gap-y-2 sm:grid-cols-[12rem_1fr]">
        <dt className="text-sm font-medium text-zinc-700">Time zone</dt>
        <dd>
          <span className="font-mono">{plant.timeZone}</span> ({zoneAbbreviation(plant.timeZone)}). Set when the plant was configured: every local
          time already stored was read in it, so it is not changed here.
        </dd>
        <dt className="text-sm font-medium text-zinc-700">Plant time now</dt>
        <dd className="font-mono">{formatPlantDateTime(new Date(), plant)}</dd>
      </dl>
      <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label={`Date format of ${plant.name}`}>
        {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
        {saved && <Alert tone="success">{saved}</Alert>}
        <Field label="Date format" hint="How every page writes dates and how date fields read what is typed." error={errors.dateFormat?.message} className="max-w-sm">
          {(ids) => (
            <Select {...ids} {...register('dateFormat')}>
              {PLANT_DATE_FORMATS.map((format) => (
                <option key={format} value={format}>
                  {format.toLowerCase()} — {formatPlantDate(sampleDay, { timeZone: 'UTC', dateFormat: format })}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Button type="submit" busy={update.isPending}>
          Save date format
        </Button>
      </form>
      <CapabilityThresholdForm plant={plant} />
    </Card>
  );
}

const thresholdFormSchema = z.object({ capabilityThreshold: z.string() }).transform((v) => ({ capabilityThreshold: typedNumber(v.capabilityThreshold) ?? Number.NaN })).pipe(z.object({ capabilityThreshold }));

/** The plant's capability threshold: the falling-capability alarm of every characteristic without its own. */
function CapabilityThresholdForm({ plant }: { plant: Plant }) {
  const update = useUpdatePlant();
  const [saved, setSaved] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<z.input<typeof thresholdFormSchema>, unknown, z.output<typeof thresholdFormSchema>>({
    resolver: zodResolver(thresholdFormSchema),
    defaultValues: { capabilityThreshold: formatFigure(plant.capabilityThreshold, 2) },
  });
  const onSubmit = handleSubmit(async (input) => {
    setSaved(null);
    try {
      const after = await update.mutateAsync({ id: plant.id, changes: input });
      setSaved(`The nightly run now compares capability with ${formatFigure(after.capabilityThreshold, 2)} where a characteristic sets no threshold of its own. The change is in the audit trail.`);
    } catch (error) {
      showServerErrors(error, setError, ['capabilityThreshold']);
    }
  });
  return (
    <form onSubmit={onSubmit} noValidate className="mt-6 space-y-4 border-t border-zinc-200 pt-5" aria-label={`Capability threshold of ${plant.name}`}>
      {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
      {saved && <Alert tone="success">{saved}</Alert>}
      <Field
        label="Capability threshold"
        hint="The nightly run raises an alarm when a characteristic's Cpk (Ppk while its chart is out of control) over its newest lots falls below this. 1.33 is a common minimum."
        error={errors.capabilityThreshold?.message}
        className="max-w-sm"
      >
        {(ids) => <Input {...ids} inputMode="decimal" autoComplete="off" className="font-mono" {...register('capabilityThreshold')} />}
      </Field>
      <Button type="submit" busy={update.isPending}>
        Save threshold
      </Button>
    </form>
  );
}
