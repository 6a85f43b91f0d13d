import type { UseFormRegisterReturn } from 'react-hook-form';
import { Field } from '@web/components/ui/Field';
import { FormButtons } from '@web/components/ui/FormButtons';
import { TextArea } from '@web/components/ui/TextArea';

interface ReasonAndActionsProps {
  /** The reason's label, e.g. "Assignable cause". */
  label: string;
  hint?: string;
  error?: string;
  /** The form's registration of its reason field. */
  reason: UseFormRegisterReturn;
  /** The submit button's words, e.g. "Freeze limits". */
  submit: string;
  busy: boolean;
  onCancel: () => void;
}

/** The end of every decision on a chart (exclude, take back in, freeze): the reason for the audit trail, then submit or cancel. */
export function ReasonAndActions({ label, hint, error, reason, submit, busy, onCancel }: ReasonAndActionsProps) {
  return (
    <>
      <Field label={label} hint={hint} error={error}>
        {(control) => <TextArea {...control} {...reason} />}
      </Field>
      <FormButtons saveLabel={submit} busy={busy} onCancel={onCancel} />
    </>
  );
}
