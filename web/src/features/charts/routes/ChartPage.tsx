import { useCallback, useMemo, useRef, useState, type ReactNode } from 'react';
import { Link, useParams, useSearchParams } from 'react-router-dom';
import { ApiError } from '@web/lib/http';
import { useMay } from '@web/app/permissions';
import { usePlantClock } from '@web/lib/catalogue';
import { FALLBACK_PLANT_CLOCK, formatPlantDate, formatPlantDateTime } from '@shared/time';
import { useChart, type ChartQuery } from '../api/chart';
import { ControlChart, type ZoomWindow } from '../components/ControlChart';
import { ChartLegend } from '../components/ChartLegend';
import { LimitsSummary } from '../components/LimitsSummary';
import { CapabilityPanel } from '../components/CapabilityPanel';
import { LimitRevisions } from '../components/LimitRevisions';
import { PointsTable } from '../components/PointsTable';
import { ExcludePointDialog, IncludePointDialog } from '../components/PointDialogs';
import { FreezeLimitsDialog } from '../components/FreezeLimitsDialog';
import { LotDetailsDialog } from '../components/LotDetailsDialog';
import { SelectedPoint } from '../components/SelectedPoint';
import { SignalList } from '../components/SignalList';
import { chartTypeLabels, ruleSetLabels } from '@shared/spc';
import { chartPeriods, type CharacteristicChart, type ChartPeriod } from '@shared/schemas/charts';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Select } from '@web/components/ui/Field';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

const periodLabels: Record<ChartPeriod, string> = {
  limits: 'Since the limits',
  '30': 'Last 30 days',
  '90': 'Last 90 days',
  '182': 'Last 6 months',
  all: 'All history',
};

/** Until the plant is known: a stable object, so the chart is not rebuilt on every render. */

const isPeriod = (value: string | null): value is ChartPeriod => (chartPeriods as readonly string[]).includes(value ?? '');

type Open =
  | { kind: 'lot'; index: number }
  | { kind: 'exclude'; index: number }
  | { kind: 'include'; index: number }
  /** The zoom window as it was when the dialog opened: the baseline it offers. */
  | { kind: 'freeze'; view: ZoomWindow | null }
  | null;

function Section({ title, actions, children, id }: { title: string; actions?: ReactNode; children: ReactNode; id?: string }) {
  return (
    <section aria-labelledby={id} className="scroll-mt-20 rounded-lg border border-zinc-200 bg-white shadow-xs">
      <header className="flex flex-wrap items-center justify-between gap-3 border-b border-zinc-200 px-5 py-3">
        <h2 id={id} className="text-lg font-semibold text-zinc-900">
          {title}
        </h2>
        {actions}
      </header>
      <div className="px-5 py-4">{children}</div>
    </section>
  );
}

export default function ChartPage() {
  const { characteristicId = '' } = useParams();
  const id = Number(characteristicId);
  const [search, setSearch] = useSearchParams();
  const periodParam = search.get('period');
  const lotParam = search.get('lot');
  // ?point=<position> came in alarm e-mails sent before links named the lot: positions count over all history.
  const pointParam = search.get('point');
  const legacyPoint = lotParam === null && pointParam !== null && /^\d{1,9}$/.test(pointParam) ? Number(pointParam) : null;
  const request = useMemo<ChartQuery>(
    () => ({ period: isPeriod(periodParam) ? periodParam : legacyPoint !== null ? 'all' : undefined, lot: lotParam || undefined }),
    [periodParam, lotParam, legacyPoint],
  );
  const chart = useChart(id, request);
  const clock = usePlantClock().data ?? FALLBACK_PLANT_CLOCK;
  const canFreeze = useMay('limits.freeze');
  const canExclude = useMay('point.exclude');

  // A point is known by its lot, which stays the same whatever the period shows.
  const [chosenLot, setSelectedLot] = useState<string | null>(lotParam || null);
  // A linked lot is brought into view as soon as the chart is drawn.
  const [reveal, setReveal] = useState(lotParam || legacyPoint !== null ? 1 : 0);
  // Read only when the freeze dialog opens: a state would re-render the page on every zoom step.
  const view = useRef<ZoomWindow | null>(null);
  const onZoom = useCallback((window: ZoomWindow) => {
    view.current = window;
  }, []);
  const [open, setOpen] = useState<Open>(null);
  const [notice, setNotice] = useState<string | null>(null);

  const points = chart.isPlaceholderData ? undefined : chart.data?.points;
  const indexOfLot = useMemo(() => new Map((points ?? []).map((p) => [p.lotNumber, p.index])), [points]);
  const selectedLot = chosenLot ?? (legacyPoint !== null ? (points?.[legacyPoint]?.lotNumber ?? null) : null);
  const selected = selectedLot === null ? null : (indexOfLot.get(selectedLot) ?? null);
  const select = useCallback((index: number) => setSelectedLot(points?.find((p) => p.index === index)?.lotNumber ?? null), [points]);
  const linkedMissing = lotParam && points && !indexOfLot.has(lotParam) ? lotParam : null;

  const showOnChart = useCallback(
    (index: number) => {
      select(index);
      setReveal((n) => n + 1);
      document.getElementById('chart-section')?.scrollIntoView({ block: 'start', behavior: 'smooth' });
    },
    [select],
  );
  const openLot = useCallback((index: number) => setOpen({ kind: 'lot', index }), []);
  const exclude = useCallback((index: number) => setOpen({ kind: 'exclude', index }), []);
  const include = useCallback((index: number) => setOpen({ kind: 'include', index }), []);

  if (!Number.isInteger(id) || id <= 0) return <NotAChart text={characteristicId} />;
  if (chart.isPending) return <ChartSkeleton />;
  if (chart.isError) {
    if (chart.error instanceof ApiError && chart.error.status === 404) return <NotAChart text={characteristicId} />;
    return <ErrorState title="Could not load the chart" error={chart.error} onRetry={() => chart.refetch()} />;
  }

  const data: CharacteristicChart = chart.data;
  const c = data.characteristic;
  const period: ChartPeriod = data.window.period === 'custom' ? 'all' : data.window.period;
  const pointAt = (index: number) => data.points.find((p) => p.index === index);
  const openPoint = open && open.kind !== 'freeze' ? pointAt(open.index) : undefined;
  const done = (message: string) => {
    setOpen(null);
    setNotice(message);
  };

  return (
    <>
      <PageHeader
        title={c.name}
        description={
          <>
            {c.productName} · line <span className="font-mono">{c.lineCode ?? '–'}</span> · {chartTypeLabels[c.chartType]}, subgroups of{' '}
            <span className="font-mono">{c.subgroupSize}</span> · {ruleSetLabels[c.ruleSet]}
          </>
        }
        actions={
          <>
            <label htmlFor="chart-period" className="self-center text-sm font-medium text-zinc-800">
              Period
            </label>
            {/* The select fills its box; the box keeps it beside its label and the link. */}
            <div className="w-60">
              <Select
                id="chart-period"
                value={period}
                onChange={(e) =>
                  setSearch((s) => {
                    s.set('period', e.target.value);
                    s.delete('lot');
                    s.delete('point');
                    return s;
                  })
                }
              >
                {chartPeriods
                  .filter((p) => p !== 'limits' || data.window.limitsFrom !== null)
                  .map((p) => (
                    <option key={p} value={p}>
                      {p === 'limits' && data.window.limitsFrom ? `${periodLabels.limits} (${formatPlantDate(data.window.limitsFrom, clock)})` : periodLabels[p]}
                    </option>
                  ))}
              </Select>
            </div>
            <Link to="/charts" className="inline-flex h-10 items-center rounded-md border border-zinc-300 bg-white px-4 font-medium text-zinc-800 hover:bg-zinc-100">
              All charts
            </Link>
          </>
        }
      />

      <div className="space-y-5" aria-busy={chart.isFetching || undefined}>
        {notice && <Alert tone="success">{notice}</Alert>}
        {linkedMissing && (
          <p role="status" className="rounded-md border border-amber-200 bg-amber-50 px-4 py-3 text-amber-950">
            Lot <span className="font-mono">{linkedMissing}</span> has no result on this chart{data.window.period === 'all' ? '' : ' in this period'}.
          </p>
        )}
        {data.reasons.length > 0 && (
          <ul aria-label="Notes on this chart" className="space-y-1 rounded-md border border-amber-200 bg-amber-50 px-4 py-3 text-sm text-amber-950">
            {data.reasons.map((r) => (
              <li key={r}>{r}</li>
            ))}
          </ul>
        )}

        <Section
          title="Control limits"
          id="limits-heading"
          actions={
            canFreeze && data.points.length > 0 ? (
              <Button variant="secondary" onClick={() => setOpen({ kind: 'freeze', view: view.current })}>
                Freeze limits…
              </Button>
            ) : undefined
          }
        >
          <LimitsSummary chart={data} clock={clock} />
        </Section>

        <div id="chart-section" className="scroll-mt-20">
          <Section title="Control chart" id="chart-heading">
            {data.points.length === 0 ? (
              <EmptyState title="No results for this characteristic in the period">
                Choose a longer period, or upload the shift's results under Results &amp; uploads; they appear here in production order.
              </EmptyState>
            ) : (
              <div className="space-y-3">
                <p className="text-sm text-zinc-600">
                  Points in production order. Drag the slider or scroll on the chart to zoom; click a point, or focus the chart and use the arrow
                  keys and Enter, to open its lot.
                </p>
                <ControlChart
                  chart={data}
                  clock={clock}
                  selected={selected}
                  onSelect={select}
                  onOpen={openLot}
                  onZoom={onZoom}
                  revealRequest={reveal}
                />
                <ChartLegend hasSpec={data.spec?.lsl != null || data.spec?.usl != null} hasTarget={data.spec?.target != null} />
                <SelectedPoint
                  chart={data}
                  index={selected}
                  clock={clock}
                  canChangeLimits={canExclude}
                  onOpenLot={openLot}
                  onExclude={exclude}
                  onInclude={include}
                />
              </div>
            )}
          </Section>
        </div>

        <Section title="Run-rule signals" id="signals-heading">
          <SignalList chart={data} clock={clock} onReveal={showOnChart} />
        </Section>

        <Section title="Capability" id="capability-heading">
          <CapabilityPanel chart={data} />
        </Section>

        <Section title="Limit revisions" id="revisions-heading">
          <LimitRevisions characteristicId={c.id} decimals={c.decimals} clock={clock} />
        </Section>

        <Section title="Process events" id="events-heading">
          {data.events.length === 0 ? (
            <p className="text-zinc-600">No process event was logged for this product and line in the period.</p>
          ) : (
            <ul className="space-y-2">
              {data.events.map((e) => (
                <li key={e.id}>
                  <span className="font-mono text-sm text-zinc-600">{formatPlantDateTime(e.occurredAt, clock)}</span> <span className="font-medium">{e.title}</span>
                  {e.description && <span className="text-zinc-700"> — {e.description}</span>}
                </li>
              ))}
            </ul>
          )}
        </Section>

        <Section title="Points" id="points-heading">
          <PointsTable
            chart={data}
            clock={clock}
            canChangeLimits={canExclude}
            onReveal={showOnChart}
            onOpenLot={openLot}
            onExclude={exclude}
            onInclude={include}
          />
        </Section>
      </div>

      {open?.kind === 'lot' && openPoint && <LotDetailsDialog lotNumber={openPoint.lotNumber} currentCode={c.code} clock={clock} onClose={() => setOpen(null)} />}
      {open?.kind === 'exclude' && openPoint && <ExcludePointDialog chart={data} point={openPoint} clock={clock} onClose={() => setOpen(null)} onDone={done} />}
      {open?.kind === 'include' && openPoint && <IncludePointDialog chart={data} point={openPoint} clock={clock} onClose={() => setOpen(null)} onDone={done} />}
      {open?.kind === 'freeze' && <FreezeLimitsDialog chart={data} clock={clock} view={open.view} onClose={() => setOpen(null)} onDone={done} />}
    </>
  );
}

function NotAChart({ text }: { text: string }) {
  return (
    <>
      <PageHeader title="Chart not found" />
      <EmptyState title={`There is no characteristic ${text}`}>
        Pick one from{' '}
        <Link to="/charts" className="font-medium text-accent-700 underline underline-offset-2">
          the list of control charts
        </Link>
        .
      </EmptyState>
    </>
  );
}

/** The page's frame at its final size while the chart loads, so nothing jumps when it arrives. */
function ChartSkeleton() {
  return (
    <div aria-busy="true">
      <div className="mb-6 h-16 w-2/3 animate-pulse rounded bg-zinc-200/70" />
      <div className="space-y-5">
        <div className="h-44 rounded-lg border border-zinc-200 bg-white" />
        <div className="flex h-[38rem] items-center justify-center rounded-lg border border-zinc-200 bg-white">
          <Loading label="Loading the chart…" />
        </div>
      </div>
    </div>
  );
}
