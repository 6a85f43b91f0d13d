import { useMemo, useState } from 'react';
import { Link, useSearchParams } from 'react-router-dom';
import { alarmStatuses, type AlarmStatus, type AlarmView } from '@shared/schemas/alarms';
import { formatFigure } from '@shared/figures';
import { useAlarms, type AlarmFilter } from '../api/alarms';
import { alarmPath, chartPath, raiseNcrPath, signalOptions, signalTone, statusTone, statusWord } from '../lib/alarm-words';
import { AcknowledgeDialog, GroupDialog } from '../components/SelectionDialogs';
import { useCharacteristics, useLines, useProducts } from '@web/lib/catalogue';
import { usePeople } from '@web/lib/people';
import { lotPath } from '@web/lib/lots';
import { useMay } from '@web/app/permissions';
import { PageHeader } from '@web/components/ui/PageHeader';
import { PlantTime } from '@web/components/PlantTime';
import { Button } from '@web/components/ui/Button';
import { Badge } from '@web/components/ui/Badge';
import { Input, Select } from '@web/components/ui/Field';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';
import { cx } from '@web/components/ui/cx';

const PAGE = 100;

/** The age choices: the API's newerThanDays / olderThanDays, one at a time. */
const ages = [
  { value: '', label: 'Any age' },
  { value: 'new:1', label: 'Detected in the last 24 hours' },
  { value: 'new:7', label: 'Detected in the last 7 days' },
  { value: 'old:7', label: 'Older than 7 days' },
  { value: 'old:30', label: 'Older than 30 days' },
] as const;

const sorts = [
  { value: 'priority', label: 'What matters this morning' },
  { value: 'newest', label: 'Newest detection first' },
  { value: 'oldest', label: 'Oldest detection first' },
] as const;

/** The filter from the address: the inbox opens on open alarms, in the order of what matters. */
function filterOf(params: URLSearchParams, limit: number): AlarmFilter & { age: string; statusTab: AlarmStatus | 'all' } {
  const raw = params.get('status');
  const statusTab: AlarmStatus | 'all' = raw === 'all' ? 'all' : alarmStatuses.includes(raw as AlarmStatus) ? (raw as AlarmStatus) : 'open';
  const age = params.get('age') ?? '';
  const [kind, days] = age.split(':');
  const sort = params.get('sort');
  return {
    statusTab,
    age,
    status: statusTab === 'all' ? undefined : statusTab,
    lineId: params.get('line') ?? undefined,
    productId: params.get('product') ?? undefined,
    characteristicId: params.get('characteristic') ?? undefined,
    rule: params.get('rule') ?? undefined,
    assignee: params.get('assignee') ?? undefined,
    newerThanDays: kind === 'new' ? days : undefined,
    olderThanDays: kind === 'old' ? days : undefined,
    sort: sort === 'newest' || sort === 'oldest' ? sort : undefined,
    q: params.get('q') ?? undefined,
    limit,
  };
}

export default function AlarmsInboxPage() {
  const [params, setParams] = useSearchParams();
  const [limit, setLimit] = useState(PAGE);
  const { statusTab, age, ...filter } = filterOf(params, limit);
  const alarms = useAlarms(filter);
  const lines = useLines().data ?? [];
  const products = useProducts().data ?? [];
  const characteristics = useCharacteristics().data ?? [];
  const people = usePeople().data ?? [];
  const mayTriage = useMay('alarm.triage');
  const mayRaiseNcr = useMay('ncr.raise');
  const [selected, setSelected] = useState<ReadonlySet<number>>(new Set());
  const [dialog, setDialog] = useState<'acknowledge' | 'group' | null>(null);
  const [typed, setTyped] = useState(filter.q ?? '');

  /** Changes one filter in the address; the selection and the page length start again. */
  const set = (key: string, value: string) => {
    // From the address as it is now, not as it was at the last render: two filters changed in quick
    // succession must both stay.
    const next = new URLSearchParams(window.location.search);
    if (value) next.set(key, value);
    else next.delete(key);
    if (key === 'product') next.delete('characteristic');
    setParams(next, { replace: true });
    setSelected(new Set());
    setLimit(PAGE);
  };

  const items = useMemo(() => alarms.data?.items ?? [], [alarms.data]);
  const shownCharacteristics = filter.productId ? characteristics.filter((c) => String(c.productId) === filter.productId) : characteristics;
  const chosen = items.filter((a) => selected.has(a.id));
  const allChosen = items.length > 0 && chosen.length === items.length;
  const toggle = (id: number) =>
    setSelected((s) => {
      const n = new Set(s);
      if (n.has(id)) n.delete(id);
      else n.add(id);
      return n;
    });
  const counts = alarms.data?.counts ?? {};
  const total = Object.values(counts).reduce((n, c) => n + (c ?? 0), 0);

  return (
    <>
      <PageHeader
        title="Alarms"
        description="Out-of-specification results, signals the SPC runs find on the charts, and falling capability. Acknowledge what you have seen, investigate, and close with what was found."
      />
      <div className="space-y-4">
        <div role="tablist" aria-label="Alarm status" className="flex flex-wrap gap-1 border-b border-zinc-200">
          {[...alarmStatuses, 'all' as const].map((s) => (
            <button
              key={s}
              role="tab"
              type="button"
              aria-selected={s === statusTab}
              onClick={() => set('status', s === 'open' ? '' : s)}
              className={cx('-mb-px border-b-2 px-3 py-2 font-medium', s === statusTab ? 'border-accent-700 text-accent-800' : 'border-transparent text-zinc-600 hover:text-zinc-900')}
            >
              {s === 'all' ? 'All' : statusWord(s)}
              {alarms.data && <span className="figures ml-1.5 text-sm">({s === 'all' ? total : (counts[s] ?? 0)})</span>}
            </button>
          ))}
        </div>

        <form
          role="search"
          aria-label="Filter the alarms"
          className="grid grid-cols-1 gap-3 sm:grid-cols-2 lg:grid-cols-4"
          onSubmit={(e) => {
            e.preventDefault();
            set('q', typed.trim());
          }}
        >
          <FilterSelect label="Line" value={filter.lineId ?? ''} onChange={(v) => set('line', v)}>
            <option value="">Every line</option>
            {lines.map((l) => (
              <option key={l.id} value={l.id}>
                {l.code} · {l.name}
              </option>
            ))}
          </FilterSelect>
          <FilterSelect label="Product" value={filter.productId ?? ''} onChange={(v) => set('product', v)}>
            <option value="">Every product</option>
            {products.map((p) => (
              <option key={p.id} value={p.id}>
                {p.code} · {p.name}
              </option>
            ))}
          </FilterSelect>
          <FilterSelect label="Characteristic" value={filter.characteristicId ?? ''} onChange={(v) => set('characteristic', v)}>
            <option value="">Every characteristic</option>
            {shownCharacteristics.map((c) => (
              <option key={c.id} value={c.id}>
                {c.code} · {c.name}
              </option>
            ))}
          </FilterSelect>
          <FilterSelect label="Signal" value={filter.rule ?? ''} onChange={(v) => set('rule', v)}>
            <option value="">Every signal</option>
            {signalOptions.map((o) => (
              <option key={o.rule} value={o.rule}>
                {o.label}
              </option>
            ))}
          </FilterSelect>
          <FilterSelect label="Assignee" value={filter.assignee ?? ''} onChange={(v) => set('assignee', v)}>
            <option value="">Anyone or nobody</option>
            <option value="me">Assigned to me</option>
            <option value="nobody">Assigned to nobody</option>
            {people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </FilterSelect>
          <FilterSelect label="Age" value={age} onChange={(v) => set('age', v)}>
            {ages.map((a) => (
              <option key={a.value} value={a.value}>
                {a.label}
              </option>
            ))}
          </FilterSelect>
          <FilterSelect label="Order" value={filter.sort ?? 'priority'} onChange={(v) => set('sort', v === 'priority' ? '' : v)}>
            {sorts.map((s) => (
              <option key={s.value} value={s.value}>
                {s.label}
              </option>
            ))}
          </FilterSelect>
          <div className="space-y-1.5">
            <label htmlFor="alarm-search" className="block text-sm font-medium text-zinc-800">
              Lot or characteristic code
            </label>
            <div className="flex gap-2">
              <Input id="alarm-search" type="search" placeholder="e.g. L1-2611" value={typed} onChange={(e) => setTyped(e.target.value)} />
              <Button type="submit" variant="secondary">
                Find
              </Button>
            </div>
          </div>
        </form>
        {!filter.sort && (
          <p className="text-sm text-zinc-600" data-testid="alarm-order">
            In order of what matters this morning: lots outside their specification first, then points beyond a control limit, then patterns and
            falling capability; the newest lot first within each.
          </p>
        )}

        {mayTriage && (
          <div className="flex flex-wrap items-center gap-2 rounded-lg border border-zinc-200 bg-zinc-50 px-3 py-2" aria-label="With the selected alarms">
            <span className="text-sm text-zinc-700">{chosen.length ? `${chosen.length} selected` : 'Select alarms to act on several at once'}</span>
            <Button size="sm" variant="secondary" disabled={!chosen.some((a) => a.status === 'open')} onClick={() => setDialog('acknowledge')}>
              Acknowledge selected
            </Button>
            <Button size="sm" variant="secondary" disabled={chosen.length < 2} onClick={() => setDialog('group')}>
              Group as one investigation
            </Button>
            {mayRaiseNcr && chosen.length > 0 && (
              <Link className="text-sm font-medium text-accent-800 underline" to={raiseNcrPath(chosen.map((a) => a.id))}>
                Raise NCR
              </Link>
            )}
          </div>
        )}

        {alarms.isPending ? (
          <Loading label="Loading alarms…" />
        ) : alarms.isError ? (
          <ErrorState title="Could not load the alarms" error={alarms.error} onRetry={() => alarms.refetch()} />
        ) : items.length === 0 ? (
          <EmptyState title="No alarm matches this filter." />
        ) : (
          <div className="overflow-x-auto rounded-lg border border-zinc-200 bg-white">
            <table className="w-full border-collapse text-left text-base">
              <caption className="sr-only">Alarms</caption>
              <thead className="bg-zinc-100/80 text-sm text-zinc-700">
                <tr>
                  {mayTriage && (
                    <th scope="col" className="w-10 border-b border-zinc-200 px-3 py-2.5">
                      <input
                        type="checkbox"
                        aria-label="Select every alarm shown"
                        checked={allChosen}
                        onChange={() => setSelected(allChosen ? new Set() : new Set(items.map((a) => a.id)))}
                        className="size-4"
                      />
                    </th>
                  )}
                  <th scope="col" className="border-b border-zinc-200 px-3 py-2.5 font-semibold">
                    Signal
                  </th>
                  <th scope="col" className="border-b border-zinc-200 px-3 py-2.5 font-semibold">
                    Characteristic and lot
                  </th>
                  <th scope="col" className="border-b border-zinc-200 px-3 py-2.5 font-semibold whitespace-nowrap">
                    Detected
                  </th>
                  <th scope="col" className="border-b border-zinc-200 px-3 py-2.5 font-semibold">
                    Status
                  </th>
                </tr>
              </thead>
              <tbody>
                {items.map((a) => (
                  <AlarmRow key={a.id} alarm={a} selectable={mayTriage} selected={selected.has(a.id)} onToggle={() => toggle(a.id)} />
                ))}
              </tbody>
            </table>
          </div>
        )}
        {items.length === limit && (
          <Button variant="secondary" size="sm" busy={alarms.isFetching} onClick={() => setLimit(limit + PAGE)}>
            Show {PAGE} more
          </Button>
        )}
        <p className="text-sm text-zinc-600">Alarms support the decision of trained staff; they do not replace their judgement, the specification or the plant procedures.</p>
      </div>
      {dialog === 'acknowledge' && <AcknowledgeDialog alarms={chosen.filter((a) => a.status === 'open')} onDone={() => (setDialog(null), setSelected(new Set()))} />}
      {dialog === 'group' && <GroupDialog alarms={chosen} onDone={() => (setDialog(null), setSelected(new Set()))} />}
    </>
  );
}

function FilterSelect({ label, value, onChange, children }: { label: string; value: string; onChange: (v: string) => void; children: React.ReactNode }) {
  const id = `alarm-filter-${label.toLowerCase()}`;
  return (
    <div className="space-y-1.5">
      <label htmlFor={id} className="block text-sm font-medium text-zinc-800">
        {label}
      </label>
      <Select id={id} value={value} onChange={(e) => onChange(e.target.value)}>
        {children}
      </Select>
    </div>
  );
}

function AlarmRow({ alarm: a, selectable, selected, onToggle }: { alarm: AlarmView; selectable: boolean; selected: boolean; onToggle: () => void }) {
  const c = a.characteristic;
  return (
    <tr className="border-b border-zinc-100 align-top last:border-b-0 hover:bg-zinc-50" data-alarm={a.id}>
      {selectable && (
        <td className="px-3 py-2">
          <input type="checkbox" className="size-4" aria-label={`Select the alarm on ${c.code}, lot ${a.lot.lotNumber}`} checked={selected} onChange={onToggle} />
        </td>
      )}
      <td className="max-w-md px-3 py-2">
        <div className="flex flex-wrap items-center gap-2">
          <Badge tone={signalTone(a.rule)}>{a.signal}</Badge>
          {a.late && <Badge tone="warning">Earlier position</Badge>}
        </div>
        <p className="mt-1 text-sm">{a.description}</p>
        <p className="mt-1 flex flex-wrap gap-x-4 text-sm font-medium">
          <Link className="text-accent-800 underline" to={alarmPath(a.id)}>
            Open the alarm
          </Link>
          <Link className="text-accent-800 underline" to={chartPath(a)}>
            Chart at this lot
          </Link>
        </p>
      </td>
      <td className="px-3 py-2 text-sm">
        <p>
          <span className="font-mono">{c.code}</span> · {c.name}
        </p>
        <p className="text-zinc-600">
          {c.productCode}
          {c.lineCode ? ` · line ${c.lineCode}` : ''} · lot{' '}
          <Link className="font-mono text-accent-800 underline" to={lotPath(a.lot.lotNumber)}>
            {a.lot.lotNumber}
          </Link>
        </p>
        {a.values.length > 0 && (
          <p className="figures text-zinc-600">
            Results {a.values.map((v) => formatFigure(v, c.decimals)).join(', ')} {c.unit}
          </p>
        )}
        {a.group && <p className="text-zinc-600">Investigation: {a.group.title}</p>}
      </td>
      <td className="figures px-3 py-2 text-sm whitespace-nowrap">
        <PlantTime at={a.detectedAt} />
      </td>
      <td className="px-3 py-2 text-sm">
        <Badge tone={statusTone(a.status)}>{statusWord(a.status)}</Badge>
        <p className="mt-1 text-zinc-600">{a.assignee ? a.assignee.name : 'Nobody assigned'}</p>
      </td>
    </tr>
  );
}
