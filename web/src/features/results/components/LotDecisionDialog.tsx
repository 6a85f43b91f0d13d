import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { lotHoldRequestSchema } from '@shared/schemas/lots';
import { showServerErrors } from '@web/lib/forms';
import type { Lot } from '@web/lib/lots';
import { useLotDecision } from '../api/lots';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { Dialog } from '@web/components/ui/Dialog';
import { Field } from '@web/components/ui/Field';
import { TextArea } from '@web/components/ui/TextArea';

const words = {
  hold: {
    title: (lot: string) => `Put lot ${lot} on hold?`,
    text: 'The lot may not be dispatched until a quality manager releases it. Subscribers of its line and product are told by e-mail; your name and reason go into the audit trail.',
    hint: 'e.g. “Retained sample lumpy; retest of flow and 28-day strength requested”.',
    button: 'Put on hold',
  },
  release: {
    title: (lot: string) => `Release lot ${lot}?`,
    text: 'The lot may be dispatched again. Subscribers of its line and product are told by e-mail; your name and reason go into the audit trail.',
    hint: 'What was checked, e.g. “Retest of the retained sample inside the specification”.',
    button: 'Release lot',
  },
} as const;

/** Asks for the reason before a lot is put on hold or released. */
export function LotDecisionDialog({ lot, action, onClose, onDone }: { lot: Lot; action: 'hold' | 'release'; onClose: () => void; onDone: () => void }) {
  const deciding = useLotDecision();
  const w = words[action];
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm({ resolver: zodResolver(lotHoldRequestSchema), defaultValues: { reason: '' } });

  const onSubmit = handleSubmit(({ reason }) =>
    deciding.mutate({ lotNumber: lot.lotNumber, action, reason }, { onSuccess: onDone, onError: (error) => showServerErrors(error, setError, ['reason']) }),
  );

  return (
    <Dialog title={w.title(lot.lotNumber)} onClose={onClose}>
      <form onSubmit={onSubmit} noValidate className="space-y-4">
        <p className="text-zinc-700">{w.text}</p>
        {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
        <Field label="Reason" hint={w.hint} error={errors.reason?.message}>
          {(control) => <TextArea {...control} autoFocus {...register('reason')} />}
        </Field>
        <div className="flex justify-end gap-2">
          <Button variant="secondary" onClick={onClose}>
            Cancel
          </Button>
          <Button type="submit" variant={action === 'hold' ? 'danger' : 'primary'} busy={deciding.isPending}>
            {w.button}
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
