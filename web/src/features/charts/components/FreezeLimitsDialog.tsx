import { useForm, type Resolver } from 'react-hook-form';
import type { PlantClock } from '@shared/time';
import { freezeLimitsSchema, type CharacteristicChart } from '@shared/schemas/charts';
import { PHASE_ONE_MIN_POINTS } from '@shared/spc';
import { showServerErrors } from '@web/lib/forms';
import { plantDateError, plantDateValue, readPlantInput } from '@web/lib/plant-dates';
import { Dialog } from '@web/components/ui/Dialog';
import { PlantDateField } from '@web/components/PlantDateInput';
import { Alert } from '@web/components/ui/Alert';
import { useFreezeLimits } from '../api/chart';
import type { ZoomWindow } from './ControlChart';
import { ReasonAndActions } from './ReasonAndActions';

interface FreezeForm {
  baselineFrom: string;
  baselineTo: string;
  reason: string;
}

const fields = ['baselineFrom', 'baselineTo', 'reason'] as const;

/** The form's plant wall times as instants; text that is no date stays as it is and fails the schema. */
function toBody(values: FreezeForm, clock: PlantClock) {
  const instant = (text: string) => readPlantInput('dateTime', text, clock)?.toISOString() ?? text;
  return { baselineFrom: instant(values.baselineFrom), baselineTo: instant(values.baselineTo), reason: values.reason };
}

/** The shared schema judges the instants the form will post, not the wall-clock text typed. */
const resolverFor =
  (clock: PlantClock): Resolver<FreezeForm> =>
  async (values) => {
    const parsed = freezeLimitsSchema.safeParse(toBody(values, clock));
    if (parsed.success) return { values, errors: {} };
    const errors: Record<string, { type: string; message: string }> = {};
    for (const key of ['baselineFrom', 'baselineTo'] as const) {
      if (!readPlantInput('dateTime', values[key], clock)) errors[key] = { type: 'format', message: plantDateError('dateTime', clock) };
    }
    for (const issue of parsed.error.issues) {
      const key = String(issue.path[0] ?? 'root');
      errors[key] ??= { type: issue.code, message: issue.message };
    }
    return { values: {}, errors };
  };

interface FreezeLimitsDialogProps {
  chart: CharacteristicChart;
  clock: PlantClock;
  /** The part of the chart in view: its first and last point make the proposed baseline. */
  view: ZoomWindow | null;
  onClose: () => void;
  onDone: (message: string) => void;
}

export function FreezeLimitsDialog({ chart, clock, view, onClose, onDone }: FreezeLimitsDialogProps) {
  const freeze = useFreezeLimits(chart.characteristic.id);
  const points = chart.points;
  const first = points.find((p) => p.index >= (view?.first ?? -Infinity)) ?? points[0];
  const last = [...points].reverse().find((p) => p.index <= (view?.last ?? Infinity)) ?? points[points.length - 1];
  const form = useForm<FreezeForm>({
    resolver: resolverFor(clock),
    defaultValues: {
      baselineFrom: first ? plantDateValue('dateTime', first.producedAt, clock) : '',
      baselineTo: last ? plantDateValue('dateTime', last.producedAt, clock) : '',
      reason: '',
    },
  });
  const { errors } = form.formState;

  const body = toBody(form.watch(), clock);
  const fromMs = Date.parse(body.baselineFrom);
  const toMs = Date.parse(body.baselineTo);
  const inBaseline = Number.isFinite(fromMs) && Number.isFinite(toMs) ? points.filter((p) => Date.parse(p.producedAt) >= fromMs && Date.parse(p.producedAt) <= toMs) : [];
  const kept = inBaseline.filter((p) => !p.excluded).length;

  const onSubmit = form.handleSubmit((values) =>
    freeze.mutate(toBody(values, clock), {
      onSuccess: (revision) => onDone(`Limits frozen as revision ${revision.revision} from ${revision.baselinePoints} points. New points are judged against them from now on.`),
      onError: (error) => {
        showServerErrors(error, form.setError, fields);
      },
    }),
  );

  return (
    <Dialog title="Freeze control limits" onClose={onClose}>
      <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label="Freeze control limits">
        <p className="text-sm text-zinc-600">
          The centre line and sigma within are estimated from the baseline period (excluded points left out) and frozen. The chart and the
          nightly run then judge every point against them until they are frozen again. Choose a period with no assignable cause left in it.
        </p>
        {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
        <div className="grid gap-4 sm:grid-cols-2">
          <PlantDateField label="Baseline from" kind="dateTime" error={errors.baselineFrom?.message} {...form.register('baselineFrom')} />
          <PlantDateField label="Baseline to" kind="dateTime" error={errors.baselineTo?.message} {...form.register('baselineTo')} />
        </div>
        <p className="figures text-sm text-zinc-700" aria-live="polite" data-testid="baseline-count">
          {inBaseline.length} points in the baseline, {kept} of them kept{kept > 0 && kept < PHASE_ONE_MIN_POINTS ? ` — fewer than ${PHASE_ONE_MIN_POINTS} gives unsteady limits` : ''}.
        </p>
        <ReasonAndActions
          label="Reason"
          hint="Why these limits, from this period, e.g. “Stable since the new sand source”."
          error={errors.reason?.message}
          reason={form.register('reason')}
          submit="Freeze limits"
          busy={freeze.isPending}
          onCancel={onClose}
        />
      </form>
    </Dialog>
  );
}
