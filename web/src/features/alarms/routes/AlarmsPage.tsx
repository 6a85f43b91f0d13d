import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { AlarmStatus, AlarmView } from '@shared/schemas/alarms';
import { formatFigure } from '@shared/figures';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { useAlarms } from '../api/alarms';
import { usePlantClock } from '@web/lib/catalogue';
import { lotPath } from '@web/lib/lots';
import { AlarmNoteDialog } from '../components/AlarmNoteDialog';
import { useMay } from '@web/app/permissions';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Button } from '@web/components/ui/Button';
import { Badge } from '@web/components/ui/Badge';
import { Input } from '@web/components/ui/Field';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';
import { cx } from '@web/components/ui/cx';

const tabs: { status: AlarmStatus; label: string; empty: string }[] = [
  { status: 'open', label: 'Open', empty: 'No open alarm: nothing waits for a decision.' },
  { status: 'acknowledged', label: 'Acknowledged', empty: 'No alarm is acknowledged and still open.' },
  { status: 'closed', label: 'Closed', empty: 'No alarm has been closed yet.' },
];

const PAGE = 100;
const DEFAULT_CLOCK: PlantClock = { timeZone: 'UTC', dateFormat: 'dd/MM/yyyy' };

/** The server's order (what matters this morning) keeps a lot's signals on one characteristic next to each other: one card each. */
function groupsOf(items: AlarmView[]): AlarmView[][] {
  const groups: AlarmView[][] = [];
  for (const a of items) {
    const last = groups.at(-1);
    if (last && last[0].characteristic.id === a.characteristic.id && last[0].lot.id === a.lot.id) last.push(a);
    else groups.push([a]);
  }
  return groups;
}

const toneOf = (rule: string) => (rule === 'out-of-spec' ? 'negative' : rule === 'we1' ? 'warning' : 'neutral');

function Signal({
  alarm,
  clock,
  mayAcknowledge,
  mayClose,
  onAction,
}: {
  alarm: AlarmView;
  clock: PlantClock;
  mayAcknowledge: boolean;
  mayClose: boolean;
  onAction: (a: 'acknowledge' | 'close') => void;
}) {
  const canAcknowledge = mayAcknowledge && alarm.status === 'open';
  const canClose = mayClose && alarm.status !== 'closed';
  return (
    <li className="flex flex-wrap items-start justify-between gap-3 border-t border-zinc-100 px-4 py-3" data-alarm={alarm.id}>
      <div className="min-w-0 flex-1 basis-80 space-y-1">
        <div className="flex flex-wrap items-center gap-2">
          <Badge tone={toneOf(alarm.rule)}>{alarm.signal}</Badge>
          {alarm.late && <Badge tone="warning">Earlier position</Badge>}
          <span className="figures text-sm text-zinc-600">detected {formatPlantDateTime(alarm.detectedAt, clock)}</span>
        </div>
        <p>{alarm.description}</p>
        {/* A limit's sentence already names figure and limit; a pattern's names the figure here. */}
        {!alarm.limit && (
          <p className="figures text-sm text-zinc-600">
            {alarm.figure.name} {alarm.figure.text}
          </p>
        )}
        {alarm.lateReason && <p className="text-sm text-amber-900">{alarm.lateReason}</p>}
        {alarm.acknowledgeNote && (
          <p className="text-sm text-zinc-600">
            Acknowledged by {alarm.acknowledgedBy}: {alarm.acknowledgeNote}
          </p>
        )}
        {alarm.closeNote && (
          <p className="text-sm text-zinc-600">
            {alarm.resolution === 'data-changed' ? 'Resolved by changed data: ' : `Closed by ${alarm.closedBy}: `}
            {alarm.closeNote}
          </p>
        )}
      </div>
      {(canAcknowledge || canClose) && (
        <div className="flex flex-wrap gap-2">
          {canAcknowledge && (
            <Button size="sm" variant="secondary" onClick={() => onAction('acknowledge')}>
              Acknowledge
            </Button>
          )}
          {canClose && (
            <Button size="sm" variant="secondary" onClick={() => onAction('close')}>
              Close
            </Button>
          )}
        </div>
      )}
    </li>
  );
}

/** One lot on one characteristic: the lot, its results, links to the chart at the lot and to the lot page, then each signal. */
function AlarmGroup({ alarms, clock, ...rest }: { alarms: AlarmView[]; clock: PlantClock; mayAcknowledge: boolean; mayClose: boolean; onAction: (a: AlarmView, action: 'acknowledge' | 'close') => void }) {
  const first = alarms[0];
  const c = first.characteristic;
  return (
    <article className="rounded-lg border border-zinc-200 bg-white" data-alarm-group={`${c.id}-${first.lot.id}`} aria-label={`${c.code}, lot ${first.lot.lotNumber}`}>
      <header className="flex flex-wrap items-start justify-between gap-x-6 gap-y-2 px-4 py-3">
        <div className="min-w-0">
          <p className="font-medium">
            <span className="font-mono">{c.code}</span> · {c.name}
          </p>
          <p className="text-sm text-zinc-600">
            {c.productCode}
            {c.lineCode ? ` · line ${c.lineCode}` : ''} · lot <span className="font-mono">{first.lot.lotNumber}</span>, produced{' '}
            <span className="figures">{formatPlantDateTime(first.lot.producedAt, clock)}</span>
          </p>
          <p className="figures text-sm text-zinc-600">
            Results {first.values.map((v) => formatFigure(v, c.decimals)).join(', ')} {c.unit}
          </p>
        </div>
        <div className="flex flex-wrap gap-x-4 gap-y-1 text-sm font-medium">
          <Link className="text-accent-800 underline" to={`/charts/${c.id}?${new URLSearchParams({ lot: first.lot.lotNumber })}`}>
            Chart at this lot
          </Link>
          <Link className="text-accent-800 underline" to={lotPath(first.lot.lotNumber)}>
            Lot page
          </Link>
        </div>
      </header>
      <ul>
        {alarms.map((a) => (
          <Signal key={a.id} alarm={a} clock={clock} mayAcknowledge={rest.mayAcknowledge} mayClose={rest.mayClose} onAction={(action) => rest.onAction(a, action)} />
        ))}
      </ul>
    </article>
  );
}

export default function AlarmsPage() {
  const [status, setStatus] = useState<AlarmStatus>('open');
  const [acting, setActing] = useState<{ alarm: AlarmView; action: 'acknowledge' | 'close' } | null>(null);
  const [typed, setTyped] = useState('');
  const [q, setQ] = useState('');
  const [limit, setLimit] = useState(PAGE);
  const alarms = useAlarms({ status, q, limit });
  const clock = usePlantClock().data ?? DEFAULT_CLOCK;
  const mayAcknowledge = useMay('alarm.acknowledge');
  const mayClose = useMay('alarm.close');
  const tab = tabs.find((t) => t.status === status)!;

  return (
    <>
      <PageHeader
        title="Alarms"
        description="Out-of-specification results, raised as soon as they are stored, and the signals the SPC runs find on the charts. Decide whether there is an assignable cause; acknowledge with what was checked, close with what was found."
      />
      <div className="space-y-4">
        <div role="tablist" aria-label="Alarm status" className="flex gap-1 border-b border-zinc-200">
          {tabs.map((t) => (
            <button
              key={t.status}
              role="tab"
              type="button"
              aria-selected={t.status === status}
              onClick={() => {
                setStatus(t.status);
                setLimit(PAGE);
              }}
              className={cx(
                '-mb-px border-b-2 px-4 py-2 font-medium',
                t.status === status ? 'border-accent-700 text-accent-800' : 'border-transparent text-zinc-600 hover:text-zinc-900',
              )}
            >
              {t.label}
              {alarms.data?.counts[t.status] !== undefined && <span className="figures ml-1.5 text-sm">({alarms.data.counts[t.status]})</span>}
            </button>
          ))}
        </div>
        <form
          role="search"
          className="flex flex-wrap items-center gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            setQ(typed.trim());
            setLimit(PAGE);
          }}
        >
          <label htmlFor="alarm-search" className="text-sm font-medium text-zinc-800">
            Lot or characteristic
          </label>
          <Input id="alarm-search" type="search" className="max-w-xs" placeholder="e.g. L1-2611 or HVL25-FLOW" value={typed} onChange={(e) => setTyped(e.target.value)} />
          <Button type="submit" variant="secondary">
            Find
          </Button>
        </form>
        <p className="text-sm text-zinc-600" data-testid="alarm-order">
          In order of what matters this morning: lots outside their specification first, then points beyond a control limit, then patterns of points;
          the newest lot first within each. The signals of one lot on one characteristic stand together.
        </p>
        {alarms.isPending ? (
          <Loading label="Loading alarms…" />
        ) : alarms.isError ? (
          <ErrorState title="Could not load the alarms" error={alarms.error} onRetry={() => alarms.refetch()} />
        ) : alarms.data.items.length === 0 ? (
          <EmptyState title={q ? `No ${tab.label.toLowerCase()} alarm matches “${q}”.` : tab.empty} />
        ) : (
          <section aria-label={`${tab.label} alarms`} className="space-y-3">
            {groupsOf(alarms.data.items).map((g) => (
              <AlarmGroup
                key={`${g[0].characteristic.id}-${g[0].lot.id}-${g[0].id}`}
                alarms={g}
                clock={clock}
                mayAcknowledge={mayAcknowledge}
                mayClose={mayClose}
                onAction={(alarm, action) => setActing({ alarm, action })}
              />
            ))}
            {alarms.data.items.length === limit && (
              <Button variant="secondary" size="sm" busy={alarms.isFetching} onClick={() => setLimit(limit + PAGE)}>
                Show {PAGE} more
              </Button>
            )}
          </section>
        )}
        <p className="text-sm text-zinc-600">Alarms support the decision of trained staff; they do not replace their judgement, the specification or the plant procedures.</p>
      </div>
      {acting && <AlarmNoteDialog alarm={acting.alarm} action={acting.action} onDone={() => setActing(null)} />}
    </>
  );
}
