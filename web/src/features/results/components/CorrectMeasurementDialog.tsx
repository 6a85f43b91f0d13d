import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { correctMeasurementSchema } from '@shared/ingest';
import { ApiError } from '@web/lib/http';
import { useCorrectMeasurement, type LotResult } from '@web/lib/lots';
import { typedNumber } from '@web/lib/form-values';
import { showServerErrors } from '@web/lib/forms';
import { TextArea } from '@web/components/ui/TextArea';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { Dialog } from '@web/components/ui/Dialog';
import { Field, Input } from '@web/components/ui/Field';
import { formatQuantity } from '@shared/figures';

export interface CorrectedReading {
  reading: LotResult;
  from: number;
  to: number;
  decimals: number;
}

/**
 * Replaces one stored reading, e.g. a typing error on the instrument sheet. The old value, the new one,
 * who changed it and why go to the audit trail; a wrong file as a whole is voided on the upload history instead.
 */
export function CorrectMeasurementDialog({
  reading,
  decimals,
  onClose,
  onCorrected,
}: {
  reading: LotResult;
  decimals: number;
  onClose: () => void;
  onCorrected: (correction: CorrectedReading) => void;
}) {
  const correcting = useCorrectMeasurement();
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm({ resolver: zodResolver(correctMeasurementSchema), defaultValues: { reason: '' } });

  const onSubmit = handleSubmit(({ value, reason }) =>
    correcting.mutate(
      { id: reading.id, value, reason },
      {
        onSuccess: (saved) => onCorrected({ reading, from: reading.value, to: saved.value, decimals }),
        onError: (error) => {
          if (error instanceof ApiError && error.status === 404) {
            setError('root', { message: 'This reading is no longer stored: its upload may have been voided meanwhile. Close the dialog to see the lot as it is now.' });
            return;
          }
          showServerErrors(error, setError, ['value', 'reason']);
        },
      },
    ),
  );

  const title = `Correct reading ${reading.replicate} of ${reading.characteristicCode}`;
  return (
    <Dialog title={title} onClose={onClose}>
      <form onSubmit={onSubmit} noValidate className="space-y-4" aria-label={title}>
        <p className="text-sm text-zinc-700">
          {reading.characteristicName}. Stored value:{' '}
          <span className="font-mono font-medium text-zinc-900" data-testid="stored-value">
            {formatQuantity(reading.value, decimals, reading.unit)}
          </span>
        </p>
        <p className="text-sm text-zinc-600">
          The stored value is replaced in every chart and calculation. The old value, your name and the reason stay in the audit trail. If
          the whole file was wrong, void its upload instead.
        </p>
        {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
        <Field label={`Corrected value (${reading.unit})`} error={errors.value?.message}>
          {(control) => <Input {...control} autoFocus inputMode="decimal" autoComplete="off" className="font-mono" {...register('value', { setValueAs: typedNumber })} />}
        </Field>
        <Field label="Reason" hint="Kept in the audit trail, e.g. “Typing error: the instrument sheet reads 4.3”." error={errors.reason?.message}>
          {(control) => <TextArea {...control} {...register('reason')} />}
        </Field>
        <div className="flex justify-end gap-2">
          <Button variant="secondary" onClick={onClose}>
            Cancel
          </Button>
          <Button type="submit" busy={correcting.isPending}>
            Save correction
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
