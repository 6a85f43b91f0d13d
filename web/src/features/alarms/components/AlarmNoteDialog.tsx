import { useState } from 'react';
import type { AlarmView } from '@shared/schemas/alarms';
import { useChangeAlarm } from '../api/alarms';
import { errorMessage } from '@web/lib/http';
import { Dialog } from '@web/components/ui/Dialog';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';

const words = {
  acknowledge: { title: 'Acknowledge the alarm', hint: 'What was checked, and what happens next (retest, lot on hold, cause being looked for).', button: 'Acknowledge' },
  close: { title: 'Close the alarm', hint: 'What was found and decided: the assignable cause, or why no action is needed.', button: 'Close the alarm' },
} as const;

/** A note is required: it goes into the alarm and the audit trail. */
export function AlarmNoteDialog({ alarm, action, onDone }: { alarm: AlarmView; action: 'acknowledge' | 'close'; onDone: () => void }) {
  const [note, setNote] = useState('');
  const change = useChangeAlarm();
  const w = words[action];
  return (
    <Dialog title={w.title} onClose={onDone}>
      <form
        className="space-y-3"
        onSubmit={(e) => {
          e.preventDefault();
          change.mutate({ id: alarm.id, action, note }, { onSuccess: onDone });
        }}
      >
        <p className="text-sm text-zinc-700">
          {alarm.signal} — {alarm.characteristic.code}, lot <span className="font-mono">{alarm.lot.lotNumber}</span>
        </p>
        <label htmlFor="alarm-note" className="block text-sm font-medium text-zinc-800">
          Note
        </label>
        <textarea
          id="alarm-note"
          required
          minLength={3}
          rows={4}
          value={note}
          onChange={(e) => setNote(e.target.value)}
          aria-describedby="alarm-note-hint"
          className="block w-full rounded-md border border-zinc-300 px-3 py-2 text-base focus:outline-2 focus:outline-accent-500"
        />
        <p id="alarm-note-hint" className="text-sm text-zinc-500">
          {w.hint}
        </p>
        {change.isError && <Alert tone="error">{errorMessage(change.error)}</Alert>}
        <div className="flex justify-end gap-2">
          <Button variant="secondary" onClick={onDone}>
            Cancel
          </Button>
          <Button type="submit" busy={change.isPending}>
            {w.button}
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
