import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { voidUploadSchema } from '@shared/ingest';
import { showServerErrors } from '@web/lib/forms';
import type { UploadListItem } from '@shared/schemas/uploads';
import { useVoidUpload } from '../api/uploads';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { Dialog } from '@web/components/ui/Dialog';
import { Field, Input } from '@web/components/ui/Field';

/** Asks for the reason before an imported upload's results leave every calculation. */
export function VoidUploadDialog({ upload, onClose, onVoided }: { upload: UploadListItem; onClose: () => void; onVoided: (measurementsVoided: number) => void }) {
  const voiding = useVoidUpload();
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm({ resolver: zodResolver(voidUploadSchema), defaultValues: { reason: '' } });

  const onSubmit = handleSubmit(({ reason }) =>
    voiding.mutate(
      { id: upload.id, reason },
      {
        onSuccess: (result) => onVoided(result.measurementsVoided),
        onError: (error) => {
          showServerErrors(error, setError, ['reason']);
        },
      },
    ),
  );

  return (
    <Dialog title={`Void upload ${upload.id}?`} onClose={onClose}>
      <form onSubmit={onSubmit} noValidate className="space-y-4">
        <p className="text-zinc-700">
          {upload.rowsImported === 1 ? 'The one result' : (
            <>
              The <span className="font-mono">{upload.rowsImported}</span> results
            </>
          )}{' '}
          of <span className="font-medium [overflow-wrap:break-word]">{upload.fileName}</span> {upload.rowsImported === 1 ? 'leaves' : 'leave'} every control chart and
          calculation. They stay in the record, marked void, with your name and reason in the audit trail. This cannot be undone; a corrected
          file can be uploaded afterwards.
        </p>
        {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
        <Field label="Reason" hint="Kept in the audit trail, e.g. “Samples mixed with the wrong water dose”." error={errors.reason?.message}>
          {(control) => <Input {...control} autoFocus autoComplete="off" {...register('reason')} />}
        </Field>
        <div className="flex justify-end gap-2">
          <Button variant="secondary" onClick={onClose}>
            Cancel
          </Button>
          <Button type="submit" variant="danger" busy={voiding.isPending}>
            Void upload
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
