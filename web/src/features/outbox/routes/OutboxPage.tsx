import { useState } from 'react';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { useOutbox } from '../api/outbox';
import { usePlantClock } from '@web/lib/catalogue';
import { ApiError } from '@web/lib/http';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Button } from '@web/components/ui/Button';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

const DEFAULT_CLOCK: PlantClock = { timeZone: 'UTC', dateFormat: 'dd/MM/yyyy' };

export default function OutboxPage() {
  const outbox = useOutbox();
  const [open, setOpen] = useState<number | null>(null);
  const clock = usePlantClock().data ?? DEFAULT_CLOCK;
  return (
    <>
      <PageHeader
        title="Mail outbox"
        description={`Without a mail relay (SMTP_URL), Prismline delivers its e-mail to a local test mail server on this machine. Here are the messages it has received, newest first; they are kept in memory until the server restarts.`}
      />
      {outbox.isPending ? (
        <Loading label="Loading messages…" />
      ) : outbox.isError ? (
        outbox.error instanceof ApiError && outbox.error.status === 404 ? (
          <EmptyState title="This server sends e-mail through a mail relay">The outbox page lists messages only while the local test mail server is in use.</EmptyState>
        ) : (
          <ErrorState title="Could not load the messages" error={outbox.error} onRetry={() => outbox.refetch()} />
        )
      ) : outbox.data.length === 0 ? (
        <EmptyState title="No message yet">Alarm e-mails and morning digests appear here once they are sent.</EmptyState>
      ) : (
        <ul className="space-y-2">
          {outbox.data.map((m) => (
            <li key={m.id} className="rounded-lg border border-zinc-200 bg-white" data-message={m.id}>
              <div className="flex flex-wrap items-start justify-between gap-3 px-4 py-3">
                <div>
                  <p className="font-medium">{m.subject}</p>
                  <p className="text-sm text-zinc-600">
                    To {m.recipients.join(', ')} · <span className="figures">{formatPlantDateTime(m.receivedAt, clock)}</span>
                  </p>
                </div>
                <Button variant="quiet" size="sm" aria-expanded={open === m.id} onClick={() => setOpen(open === m.id ? null : m.id)}>
                  {open === m.id ? 'Hide the text' : 'Show the text'}
                </Button>
              </div>
              {open === m.id && <pre className="border-t border-zinc-200 px-4 py-3 text-sm whitespace-pre-wrap [overflow-wrap:anywhere]">{m.text}</pre>}
            </li>
          ))}
        </ul>
      )}
    </>
  );
}
