import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { createLineSchema } from '@shared/schemas/catalogue';
import { showServerErrors } from '@web/lib/forms';
import type { LineView } from '@shared/schemas/catalogue';
import { useCreateLine, useUpdateLine } from '../api/catalogue';
import { Field, Input } from '@web/components/ui/Field';
import { Alert } from '@web/components/ui/Alert';
import { FormButtons } from '@web/components/ui/FormButtons';

const fields = ['code', 'name'] as const;

/** Adds a line, or changes one given as `line`; its code is fixed once lots were made on it. */
export function LineForm({ line, onSaved, onCancel }: { line?: LineView; onSaved: (line: LineView) => void; onCancel: () => void }) {
  const create = useCreateLine();
  const update = useUpdateLine();
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm({ resolver: zodResolver(createLineSchema), defaultValues: { code: line?.code ?? '', name: line?.name ?? '' } });

  const onSubmit = handleSubmit(async (input) => {
    try {
      onSaved(line ? await update.mutateAsync({ id: line.id, changes: input }) : await create.mutateAsync(input));
    } catch (error) {
      showServerErrors(error, setError, fields);
    }
  });

  const codeFixed = !!line?.hasLots;
  return (
    <form onSubmit={onSubmit} noValidate className="space-y-5" aria-label={line ? `Change line ${line.code}` : 'Add a line'}>
      {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
      <div className="grid gap-x-5 gap-y-4 sm:grid-cols-[12rem_1fr]">
        <Field
          label="Code"
          hint={codeFixed ? 'Fixed: lots made on this line are recorded under it.' : 'Written on lots and in uploads, e.g. L3.'}
          error={errors.code?.message}
        >
          {(control) => <Input {...control} readOnly={codeFixed} autoComplete="off" className="font-mono uppercase" {...register('code')} />}
        </Field>
        <Field label="Name" hint="As menus and reports show it, e.g. “Line 3 · renders”." error={errors.name?.message}>
          {(control) => <Input {...control} autoComplete="off" {...register('name')} />}
        </Field>
      </div>
      <FormButtons saveLabel={line ? 'Save changes' : 'Add line'} busy={create.isPending || update.isPending} onCancel={onCancel} />
    </form>
  );
}
