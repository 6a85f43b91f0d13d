import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { AlarmStatus, AlarmView } from '@shared/schemas/alarms';
import { useAlarms } from '../api/alarms';
import { usePlantTimeZone } from '@web/lib/catalogue';
import { formatPlantDateTime } from '@web/lib/plant-time';
import { ruleLabels } from '@web/lib/chart-format';
import type { RuleId } from '@shared/spc';
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
const fmt = (v: number, d: number) => v.toFixed(Math.max(0, Math.min(6, d)));

/** "Rule 4", "Trend": the run rule as the chart page names it; null for an out-of-specification alarm. */
function ruleName(rule: string): string | null {
  const label = ruleLabels[rule as RuleId] as string | undefined;
  return label ? label.split(' · ')[0] : null;
}

function AlarmRow({
  alarm,
  timeZone,
  mayAcknowledge,
  mayClose,
  onAction,
}: {
  alarm: AlarmView;
  timeZone: string;
  mayAcknowledge: boolean;
  mayClose: boolean;
  onAction: (a: 'acknowledge' | 'close') => void;
}) {
  const c = alarm.characteristic;
  const rule = ruleName(alarm.rule);
  return (
    <tr className="border-b border-zinc-100 align-top" data-alarm={alarm.id}>
      <td className="figures px-3 py-2 text-sm">{formatPlantDateTime(alarm.createdAt, timeZone)}</td>
      <td className="px-3 py-2">
        <span className="block font-medium">{alarm.signal}</span>
        {rule && (
          <span className="block text-sm text-zinc-600">
            {rule} · {alarm.chart === 'location' ? 'location chart' : 'dispersion chart'}
          </span>
        )}
        {alarm.late && <Badge tone="warning">Earlier position</Badge>}
      </td>
      <td className="px-3 py-2">
        <span className="block font-mono text-sm">{c.code}</span>
        <span className="block text-sm text-zinc-600">
          {c.name} · {c.productCode}
          {c.lineCode ? ` · line ${c.lineCode}` : ''}
        </span>
      </td>
      <td className="px-3 py-2">
        <span className="block font-mono text-sm whitespace-nowrap">{alarm.lot.lotNumber}</span>
        <span className="block text-sm text-zinc-600">produced {formatPlantDateTime(alarm.lot.producedAt, timeZone)}</span>
      </td>
      <td className="figures px-3 py-2 text-sm">
        <span className="block">
          {alarm.values.map((v) => fmt(v, c.decimals)).join(', ')} {c.unit}
        </span>
        {alarm.limitName && alarm.limitValue !== null && (
          <span className="block text-zinc-600">
            {alarm.limitName} {fmt(alarm.limitValue, c.decimals + 1)} {c.unit}
          </span>
        )}
      </td>
      {/* The account of what happened is the longest text of the row: it gets the room, the date wraps instead. */}
      <td className="max-w-md min-w-52 px-3 py-2 text-sm">
        <p>{alarm.description}</p>
        {alarm.lateReason && <p className="mt-1 text-amber-900">{alarm.lateReason}</p>}
        {alarm.acknowledgeNote && (
          <p className="mt-1 text-zinc-600">
            Acknowledged by {alarm.acknowledgedBy}: {alarm.acknowledgeNote}
          </p>
        )}
        {alarm.closeNote && (
          <p className="mt-1 text-zinc-600">
            {alarm.resolution === 'data-changed' ? 'Resolved by changed data: ' : `Closed by ${alarm.closedBy}: `}
            {alarm.closeNote}
          </p>
        )}
      </td>
      <td className="px-3 py-2">
        <div className="flex flex-col items-start gap-1">
          <Link className="text-sm font-medium text-accent-800 underline" to={`/charts/${c.id}?point=${alarm.pointIndex}`}>
            Point {alarm.pointIndex + 1} on the chart
          </Link>
          {mayAcknowledge && alarm.status === 'open' && (
            <Button size="sm" variant="secondary" onClick={() => onAction('acknowledge')}>
              Acknowledge
            </Button>
          )}
          {mayClose && alarm.status !== 'closed' && (
            <Button size="sm" variant="secondary" onClick={() => onAction('close')}>
              Close
            </Button>
          )}
        </div>
      </td>
    </tr>
  );
}

export default function AlarmsPage() {
  const [status, setStatus] = useState<AlarmStatus>('open');
  const [acting, setActing] = useState<{ alarm: AlarmView; action: 'acknowledge' | 'close' } | null>(null);
  const [typed, setTyped] = useState('');
  const [q, setQ] = useState('');
  const [limit, setLimit] = useState(PAGE);
  const alarms = useAlarms({ status, q, limit });
  const timeZone = usePlantTimeZone().data ?? 'UTC';
  const mayAcknowledge = useMay('alarm.acknowledge');
  const mayClose = useMay('alarm.close');
  const tab = tabs.find((t) => t.status === status)!;

  return (
    <>
      <PageHeader
        title="Alarms"
        description="Out-of-specification results, raised as soon as they are stored, and the run-rule signals of the SPC runs. Decide whether there is an assignable cause; acknowledge with what was checked, close with what was found."
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
        {alarms.isPending ? (
          <Loading label="Loading alarms…" />
        ) : alarms.isError ? (
          <ErrorState title="Could not load the alarms" error={alarms.error} onRetry={() => alarms.refetch()} />
        ) : alarms.data.items.length === 0 ? (
          <EmptyState title={q ? `No ${tab.label.toLowerCase()} alarm matches “${q}”.` : tab.empty} />
        ) : (
          <div className="overflow-x-auto rounded-lg border border-zinc-200 bg-white">
            <table className="w-full border-collapse text-left">
              <caption className="sr-only">{tab.label} alarms, newest first</caption>
              <thead className="bg-zinc-100/80 text-sm text-zinc-700">
                <tr>
                  {['Raised (plant time)', 'Signal', 'Characteristic', 'Lot', 'Values and limit', 'What happened', ''].map((h) => (
                    <th key={h} scope="col" className="border-b border-zinc-200 px-3 py-2.5 align-bottom font-semibold">
                      {h}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {alarms.data.items.map((a) => (
                  <AlarmRow
                    key={a.id}
                    alarm={a}
                    timeZone={timeZone}
                    mayAcknowledge={mayAcknowledge}
                    mayClose={mayClose}
                    onAction={(action) => setActing({ alarm: a, action })}
                  />
                ))}
              </tbody>
            </table>
            {alarms.data.items.length === limit && (
              <div className="border-t border-zinc-200 p-3">
                <Button variant="secondary" size="sm" busy={alarms.isFetching} onClick={() => setLimit(limit + PAGE)}>
                  Show {PAGE} more
                </Button>
              </div>
            )}
          </div>
        )}
        <p className="text-sm text-zinc-600">Alarms support the decision of trained staff; they do not replace their judgement, the specification or the plant procedures.</p>
      </div>
      {acting && <AlarmNoteDialog alarm={acting.alarm} action={acting.action} onDone={() => setActing(null)} />}
    </>
  );
}
