import { useState } from 'react';
import type { AlarmView } from '@shared/schemas/alarms';
import { useAcknowledgeAlarms, useCreateAlarmGroup } from '../api/alarms';
import { fieldMessages } from '../lib/alarm-words';
import { errorMessage } from '@web/lib/http';
import { Dialog } from '@web/components/ui/Dialog';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Field, Input } from '@web/components/ui/Field';
import { TextArea } from '@web/components/ui/TextArea';

function Chosen({ alarms }: { alarms: AlarmView[] }) {
  return (
    <ul className="max-h-40 space-y-0.5 overflow-y-auto text-sm text-zinc-700">
      {alarms.map((a) => (
        <li key={a.id}>
          {a.signal} — <span className="font-mono">{a.characteristic.code}</span>, lot <span className="font-mono">{a.lot.lotNumber}</span>
        </li>
      ))}
    </ul>
  );
}

/** Acknowledges the open alarms of the selection at once, with an optional note. */
export function AcknowledgeDialog({ alarms, onDone }: { alarms: AlarmView[]; onDone: () => void }) {
  const [note, setNote] = useState('');
  const acknowledge = useAcknowledgeAlarms();
  const errors = fieldMessages(acknowledge.error);
  return (
    <Dialog title={`Acknowledge ${alarms.length} open alarm${alarms.length === 1 ? '' : 's'}`} onClose={onDone}>
      <form
        className="space-y-3"
        onSubmit={(e) => {
          e.preventDefault();
          acknowledge.mutate({ ids: alarms.map((a) => a.id), ...(note.trim() ? { note: note.trim() } : {}) }, { onSuccess: onDone });
        }}
      >
        <Chosen alarms={alarms} />
        <Field label="Note (optional)" hint="What was checked, and what happens next." error={errors.note}>
          {(ids) => <TextArea id={ids.id} describedBy={ids.describedBy} invalid={ids.invalid} value={note} onChange={(e) => setNote(e.target.value)} />}
        </Field>
        {acknowledge.isError && !errors.note && <Alert tone="error">{errorMessage(acknowledge.error)}</Alert>}
        <div className="flex justify-end gap-2">
          <Button variant="secondary" onClick={onDone}>
            Cancel
          </Button>
          <Button type="submit" busy={acknowledge.isPending}>
            Acknowledge
          </Button>
        </div>
      </form>
    </Dialog>
  );
}

/** Puts the selected alarms under one investigation (one cause behind several signals). */
export function GroupDialog({ alarms, onDone }: { alarms: AlarmView[]; onDone: () => void }) {
  const [title, setTitle] = useState('');
  const [note, setNote] = useState('');
  const group = useCreateAlarmGroup();
  const errors = fieldMessages(group.error);
  return (
    <Dialog title={`One investigation of ${alarms.length} alarms`} onClose={onDone}>
      <form
        className="space-y-3"
        onSubmit={(e) => {
          e.preventDefault();
          group.mutate({ title: title.trim(), ...(note.trim() ? { note: note.trim() } : {}), alarmIds: alarms.map((a) => a.id) }, { onSuccess: onDone });
        }}
      >
        <Chosen alarms={alarms} />
        <Field label="Title" hint="What the alarms have in common, e.g. the sand delivery of Monday." error={errors.title}>
          {(ids) => <Input id={ids.id} describedBy={ids.describedBy} invalid={ids.invalid} value={title} onChange={(e) => setTitle(e.target.value)} />}
        </Field>
        <Field label="Note (optional)" error={errors.note}>
          {(ids) => <TextArea id={ids.id} describedBy={ids.describedBy} invalid={ids.invalid} value={note} onChange={(e) => setNote(e.target.value)} />}
        </Field>
        {group.isError && !errors.title && !errors.note && <Alert tone="error">{errorMessage(group.error)}</Alert>}
        <div className="flex justify-end gap-2">
          <Button variant="secondary" onClick={onDone}>
            Cancel
          </Button>
          <Button type="submit" busy={group.isPending}>
            Group the alarms
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
