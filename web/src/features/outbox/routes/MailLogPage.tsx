import { useState } from 'react';
import type { MailLogEntry } from '@shared/schemas/mail-log';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { useMailLog, useMailMessage } from '../api/mail-log';
import { usePlantClock } from '@web/lib/catalogue';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Button } from '@web/components/ui/Button';
import { Badge } from '@web/components/ui/Badge';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

const PAGE_SIZE = 50;
const DEFAULT_CLOCK: PlantClock = { timeZone: 'UTC', dateFormat: 'dd/MM/yyyy' };
const kindWords: Record<string, string> = { alarm: 'Alarm', digest: 'Morning digest' };

function MessageText({ id }: { id: number }) {
  const message = useMailMessage(id);
  if (message.isPending) return <Loading label="Loading the text…" />;
  if (message.isError) return <ErrorState title="Could not load the text" error={message.error} onRetry={() => message.refetch()} />;
  return <pre className="border-t border-zinc-200 px-4 py-3 text-sm whitespace-pre-wrap [overflow-wrap:anywhere]">{message.data.text}</pre>;
}

function Entry({ m, clock, open, onToggle }: { m: MailLogEntry; clock: PlantClock; open: boolean; onToggle: () => void }) {
  return (
    <li className="rounded-lg border border-zinc-200 bg-white" data-mail={m.id}>
      <div className="flex flex-wrap items-start justify-between gap-3 px-4 py-3">
        <div className="min-w-0 flex-1 basis-80">
          <p className="font-medium [overflow-wrap:anywhere]">{m.subject}</p>
          <p className="text-sm text-zinc-600">
            {kindWords[m.kind] ?? 'Message'} · to {m.to} ·{' '}
            <span className="figures">{m.sentAt ? `sent ${formatPlantDateTime(m.sentAt, clock)}` : `queued ${formatPlantDateTime(m.queuedAt, clock)}`}</span>
          </p>
          {m.status === 'pending' && m.lastError && (
            <p className="text-sm text-amber-900">
              Not sent yet after {m.attempts} attempt{m.attempts === 1 ? '' : 's'}: {m.lastError}
            </p>
          )}
        </div>
        <div className="flex items-center gap-2">
          <Badge tone={m.status === 'sent' ? 'positive' : 'warning'}>{m.status === 'sent' ? 'Sent' : 'Waiting to be sent'}</Badge>
          <Button variant="quiet" size="sm" aria-expanded={open} onClick={onToggle}>
            {open ? 'Hide the text' : 'Show the text'}
          </Button>
        </div>
      </div>
      {open && <MessageText id={m.id} />}
    </li>
  );
}

/** Every e-mail Prismline sent or still tries to send: alarms by lot and the morning digests. */
export default function MailLogPage() {
  const [page, setPage] = useState(1);
  const [open, setOpen] = useState<number | null>(null);
  const log = useMailLog(page, PAGE_SIZE);
  const clock = usePlantClock().data ?? DEFAULT_CLOCK;
  const pages = log.data ? Math.max(1, Math.ceil(log.data.total / log.data.pageSize)) : 1;
  return (
    <>
      <PageHeader
        title="Sent e-mail"
        description={`The alarm e-mails and morning digests Prismline sent, newest first, with whom they went to. A message that could not be sent yet stays here and is tried again.`}
      />
      {log.isPending ? (
        <Loading label="Loading the messages…" />
      ) : log.isError ? (
        <ErrorState title="Could not load the messages" error={log.error} onRetry={() => log.refetch()} />
      ) : log.data.items.length === 0 ? (
        <EmptyState title="No e-mail yet">Alarm e-mails and morning digests appear here once they are queued.</EmptyState>
      ) : (
        <div className="space-y-3">
          <ul className="space-y-2">
            {log.data.items.map((m) => (
              <Entry key={m.id} m={m} clock={clock} open={open === m.id} onToggle={() => setOpen(open === m.id ? null : m.id)} />
            ))}
          </ul>
          <nav aria-label="Pages" className="flex flex-wrap items-center gap-3">
            <Button variant="secondary" size="sm" disabled={page <= 1} onClick={() => setPage(page - 1)}>
              Newer
            </Button>
            <span className="figures text-sm text-zinc-700">
              Page {page} of {pages} · {log.data.total} message{log.data.total === 1 ? '' : 's'}
            </span>
            <Button variant="secondary" size="sm" disabled={page >= pages} onClick={() => setPage(page + 1)}>
              Older
            </Button>
          </nav>
        </div>
      )}
    </>
  );
}
