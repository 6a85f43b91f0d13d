import { useForm } from 'react-hook-form';
import { formatFigure } from '@shared/figures';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { zodResolver } from '@hookform/resolvers/zod';
import { excludePointSchema, includePointSchema, type CharacteristicChart, type ChartPointRecord } from '@shared/schemas/charts';
import { showServerErrors } from '@web/lib/forms';
import { Dialog } from '@web/components/ui/Dialog';
import { Alert } from '@web/components/ui/Alert';
import { useExcludePoint, useIncludePoint } from '../api/chart';
import { statisticNames } from '@shared/spc';
import { ReasonAndActions } from './ReasonAndActions';

interface PointDialogProps {
  chart: CharacteristicChart;
  point: ChartPointRecord;
  clock: PlantClock;
  onClose: () => void;
  onDone: (message: string) => void;
}

function PointSummary({ chart, point, clock }: Omit<PointDialogProps, 'onClose' | 'onDone'>) {
  const { unit, decimals, chartType } = chart.characteristic;
  return (
    <p className="text-sm text-zinc-700">
      Lot <span className="font-mono">{point.lotNumber}</span>, produced <span className="font-mono">{formatPlantDateTime(point.producedAt, clock)}</span>:{' '}
      {statisticNames[chartType].location} <span className="font-mono">{formatFigure(point.location, decimals + 1)}</span> {unit}.
    </p>
  );
}

/** Leaves a point out of the limit calculation; the reason is the assignable cause and goes to the audit trail. */
export function ExcludePointDialog({ chart, point, clock, onClose, onDone }: PointDialogProps) {
  const exclude = useExcludePoint(chart.characteristic.id);
  const form = useForm({ resolver: zodResolver(excludePointSchema), defaultValues: { lotId: point.lotId, reason: '' } });
  const { errors } = form.formState;
  const frozen = chart.limits.source === 'frozen';

  const onSubmit = form.handleSubmit((input) =>
    exclude.mutate(input, {
      onSuccess: () => onDone(`Lot ${point.lotNumber} is excluded${frozen ? '; the frozen limits stay as they are until limits are frozen again' : ' and the trial limits were recomputed'}.`),
      onError: (error) => {
        showServerErrors(error, form.setError, ['reason']);
      },
    }),
  );

  return (
    <Dialog title="Exclude the point from the limits" onClose={onClose}>
      <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Exclude the point from the limits">
        <PointSummary chart={chart} point={point} clock={clock} />
        <p className="text-sm text-zinc-600">
          Exclude a point only for an assignable cause that was found and removed. It stays on the chart, marked, and is left out of the
          centre line, the limits and the run rules.
        </p>
        {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
        <ReasonAndActions
          label="Assignable cause"
          hint="What went wrong with this lot or its test, in a few words."
          error={errors.reason?.message}
          reason={form.register('reason')}
          submit="Exclude point"
          busy={exclude.isPending}
          onCancel={onClose}
        />
      </form>
    </Dialog>
  );
}

/** Takes an excluded point back into the calculation; the exclusion stays on record. */
export function IncludePointDialog({ chart, point, clock, onClose, onDone }: PointDialogProps) {
  const include = useIncludePoint(chart.characteristic.id);
  const form = useForm({ resolver: zodResolver(includePointSchema), defaultValues: { reason: '' } });
  const { errors } = form.formState;

  const onSubmit = form.handleSubmit(({ reason }) =>
    include.mutate(
      { lotId: point.lotId, reason },
      {
        onSuccess: () => onDone(`Lot ${point.lotNumber} counts towards the limits again.`),
        onError: (error) => {
          showServerErrors(error, form.setError, ['reason']);
        },
      },
    ),
  );

  return (
    <Dialog title="Take the point back into the limits" onClose={onClose}>
      <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Take the point back into the limits">
        <PointSummary chart={chart} point={point} clock={clock} />
        <p className="text-sm text-zinc-700">
          Excluded because: <q>{point.exclusionReason}</q>
        </p>
        {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
        <ReasonAndActions
          label="Why the exclusion no longer holds"
          error={errors.reason?.message}
          reason={form.register('reason')}
          submit="Take back in"
          busy={include.isPending}
          onCancel={onClose}
        />
      </form>
    </Dialog>
  );
}
