import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { AuditEventView } from '@shared/schemas/audit-events';
import { roleLabels, type Role } from '@shared/schemas/roles';
import { Button } from '@web/components/ui/Button';
import { PlantTime } from '@web/components/PlantTime';
import { BeforeAfter } from './BeforeAfter';

const roleWord = (role: string) => (Object.hasOwn(roleLabels, role) ? roleLabels[role as Role] : role);

function EventItem({ e }: { e: AuditEventView }) {
  const [open, setOpen] = useState(false);
  const panelId = `audit-event-${e.seq}`;
  return (
    <li className="rounded-lg border border-zinc-200 bg-white" data-seq={e.seq}>
      <div className="flex flex-wrap items-start gap-x-4 gap-y-2 px-4 py-3">
        <div className="w-40 shrink-0 text-sm text-zinc-700">
          <PlantTime at={e.at} className="figures block font-medium text-zinc-900" />
          <span className="figures block text-zinc-500">chain link {e.seq}</span>
        </div>
        <div className="min-w-0 flex-1 basis-72">
          <p className="font-medium [overflow-wrap:anywhere]">{e.sentence}</p>
          <p className="text-sm text-zinc-600">
            {e.actor ? (
              <>
                {e.actor.name} <span className="text-zinc-500">({roleWord(e.actor.role)})</span>
              </>
            ) : (
              'The system, by itself'
            )}
            {' · '}
            {e.entity} {e.entityId && <span className="font-mono">{e.entityId}</span>} · {e.action}
          </p>
          {e.reason && <p className="mt-1 text-sm text-zinc-800 [overflow-wrap:anywhere] whitespace-pre-wrap">Reason: {e.reason}</p>}
        </div>
        <div className="flex flex-wrap items-center gap-2">
          {e.link && (
            <Link to={e.link} className="text-sm font-medium text-accent-800 underline underline-offset-2">
              Open the {e.entity}
            </Link>
          )}
          <Button variant="quiet" size="sm" aria-expanded={open} aria-controls={panelId} onClick={() => setOpen(!open)}>
            {open ? 'Hide before and after' : 'Before and after'}
          </Button>
        </div>
      </div>
      {open && (
        <div id={panelId} className="border-t border-zinc-200 px-4 py-3">
          <BeforeAfter before={e.before} after={e.after} />
        </div>
      )}
    </li>
  );
}

/** The events in chain order, newest first; each opens to its before and after. */
export function EventList({ events }: { events: readonly AuditEventView[] }) {
  return (
    <ol className="space-y-2" aria-label="Audit events, newest first">
      {events.map((e) => (
        <EventItem key={e.seq} e={e} />
      ))}
    </ol>
  );
}
