import { useMemo, useState } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import { ncrActionKinds, type NcrActionView, type NcrView } from '@shared/schemas/ncrs';
import { FALLBACK_PLANT_CLOCK } from '@shared/time';
import { useAddNcrAction, useUpdateNcrAction } from '../api/ncrs';
import { actionFormSchema, type ActionForm } from '../lib/form-schemas';
import { formatPlantDay, plantDayOf } from '@web/lib/plant-days';
import { actionKindWords } from '../lib/words';
import { Section, WriteError } from './Section';
import { usePlantClock } from '@web/lib/catalogue';
import { usePeople } from '@web/lib/people';
import { showServerErrors } from '@web/lib/forms';
import { plantDateValue, readPlantInput, plantDateError } from '@web/lib/plant-dates';
import { useSignedInUser } from '@web/lib/session';
import { PlantDateField, PlantDateInput } from '@web/components/PlantDateInput';
import { plantIso } from '@shared/time';
import { Badge } from '@web/components/ui/Badge';
import { Button } from '@web/components/ui/Button';
import { Field, Select } from '@web/components/ui/Field';
import { TextArea } from '@web/components/ui/TextArea';
import { Alert } from '@web/components/ui/Alert';

/** Corrective and preventive actions: who does what by when, and the evidence that it was done. */
export function Actions({ ncr, mayManage, mayRaise }: { ncr: NcrView; mayManage: boolean; mayRaise: boolean }) {
  const [adding, setAdding] = useState(false);
  const me = useSignedInUser();
  const open = ncr.status !== 'closed';
  return (
    <Section
      id="actions"
      title="Corrective and preventive actions"
      aside={
        mayManage &&
        open &&
        !adding && (
          <Button size="sm" variant="secondary" className="print:hidden" onClick={() => setAdding(true)}>
            Add an action
          </Button>
        )
      }
    >
      {adding && <AddAction ncr={ncr} onDone={() => setAdding(false)} />}
      {ncr.actions.length === 0 ? (
        <p className="text-zinc-600">No action yet.</p>
      ) : (
        <ol className="space-y-3">
          {ncr.actions.map((a, i) => (
            <ActionItem key={a.id} ncr={ncr} action={a} number={i + 1} mayRecord={open && (mayManage || (mayRaise && a.owner.id === me.id))} />
          ))}
        </ol>
      )}
    </Section>
  );
}

function ActionItem({ ncr, action, number, mayRecord }: { ncr: NcrView; action: NcrActionView; number: number; mayRecord: boolean }) {
  const clock = usePlantClock().data ?? FALLBACK_PLANT_CLOCK;
  const [recording, setRecording] = useState(false);
  return (
    <li className="ncr-keep rounded-md border border-zinc-200 px-4 py-3" data-action={action.id}>
      <div className="flex flex-wrap items-center gap-2">
        <span className="figures font-semibold">{number}.</span>
        <Badge tone="neutral">{actionKindWords[action.kind]}</Badge>
        {action.doneDate ? (
          <Badge tone="positive">Done {formatPlantDay(action.doneDate, clock)}</Badge>
        ) : action.overdue ? (
          <Badge tone="negative">Overdue: was due {formatPlantDay(action.dueDate, clock)}</Badge>
        ) : (
          <Badge tone="warning">Open</Badge>
        )}
      </div>
      <p className="mt-1 whitespace-pre-line">{action.description}</p>
      <p className="figures text-sm text-zinc-600">
        {action.owner.name} · due {formatPlantDay(action.dueDate, clock)}
      </p>
      {action.evidence && (
        <p className="mt-1 text-sm whitespace-pre-line">
          <span className="font-medium">Evidence:</span> {action.evidence}
        </p>
      )}
      {mayRecord && !recording && (
        <Button size="sm" variant="secondary" className="mt-2 print:hidden" onClick={() => setRecording(true)}>
          {action.doneDate ? 'Change the evidence' : 'Record as done'}
        </Button>
      )}
      {recording && <RecordDone ncr={ncr} action={action} onDone={() => setRecording(false)} />}
    </li>
  );
}

function RecordDone({ ncr, action, onDone }: { ncr: NcrView; action: NcrActionView; onDone: () => void }) {
  const clock = usePlantClock().data ?? FALLBACK_PLANT_CLOCK;
  const update = useUpdateNcrAction(ncr.id);
  const [day, setDay] = useState(action.doneDate ? formatPlantDay(action.doneDate, clock) : plantDateValue('date', new Date(), clock));
  const [evidence, setEvidence] = useState(action.evidence ?? '');
  const [dayError, setDayError] = useState<string | null>(null);
  return (
    <form
      className="mt-3 space-y-3 border-t border-zinc-100 pt-3"
      aria-label={`Action ${action.id} done`}
      onSubmit={(e) => {
        e.preventDefault();
        const instant = readPlantInput('date', day, clock);
        if (!instant) return setDayError(plantDateError('date', clock));
        setDayError(null);
        update.mutate({ actionId: action.id, changes: { doneDate: plantDayOf(plantIso(instant, clock.timeZone)), evidence: evidence.trim() || null } }, { onSuccess: onDone });
      }}
    >
      <Field label="Done on" error={dayError ?? undefined}>
        {(ids) => <PlantDateInput kind="date" {...ids} value={day} onChange={(e) => setDay(e.target.value)} />}
      </Field>
      <Field label="Evidence" hint="What shows it was done: a record, a test result, a training list.">
        {(ids) => <TextArea {...ids} rows={3} maxLength={5000} value={evidence} onChange={(e) => setEvidence(e.target.value)} />}
      </Field>
      {update.isError && <WriteError error={update.error} />}
      <div className="flex gap-2">
        <Button type="submit" size="sm" busy={update.isPending}>
          Save
        </Button>
        <Button size="sm" variant="secondary" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}

const actionFields = ['kind', 'description', 'ownerId', 'dueDate'] as const;

function AddAction({ ncr, onDone }: { ncr: NcrView; onDone: () => void }) {
  const clock = usePlantClock().data ?? FALLBACK_PLANT_CLOCK;
  const people = usePeople();
  const add = useAddNcrAction(ncr.id);
  const schema = useMemo(() => actionFormSchema(clock), [clock]);
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors },
  } = useForm<ActionForm, unknown, ReturnType<typeof schema.parse>>({ resolver: zodResolver(schema), defaultValues: { kind: 'corrective', description: '', ownerId: '', dueDate: '' } });
  return (
    <form
      noValidate
      aria-label="Add an action"
      className="mb-4 space-y-3 rounded-md border border-zinc-200 bg-zinc-50 px-4 py-3 print:hidden"
      onSubmit={handleSubmit((input) => add.mutate(input, { onSuccess: onDone, onError: (error) => showServerErrors(error, setError, actionFields) }))}
    >
      {errors.root && <Alert tone="error">{errors.root.message}</Alert>}
      <div className="grid gap-3 sm:grid-cols-3">
        <Field label="Kind" error={errors.kind?.message} hint="Corrective removes the cause; preventive keeps it from happening elsewhere.">
          {(ids) => (
            <Select {...ids} {...register('kind')}>
              {ncrActionKinds.map((k) => (
                <option key={k} value={k}>
                  {actionKindWords[k]}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <Field label="Owner" error={errors.ownerId?.message}>
          {(ids) => (
            <Select {...ids} {...register('ownerId')}>
              <option value="">Choose…</option>
              {(people.data ?? []).map((p) => (
                <option key={p.id} value={p.id}>
                  {p.name}
                </option>
              ))}
            </Select>
          )}
        </Field>
        <PlantDateField label="Due date" kind="date" error={errors.dueDate?.message} {...register('dueDate')} />
      </div>
      <Field label="What is to be done" error={errors.description?.message}>
        {(ids) => <TextArea {...ids} rows={3} maxLength={2000} {...register('description')} />}
      </Field>
      <div className="flex gap-2">
        <Button type="submit" busy={add.isPending}>
          Add the action
        </Button>
        <Button variant="secondary" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
