import { useMemo } from 'react';
import { useSearchParams } from 'react-router-dom';
import { useOverview } from '../api/overview';
import { usePlantClock } from '@web/lib/catalogue';
import { CharacteristicTile } from '../components/CharacteristicTile';
import { HeldLots } from '../components/HeldLots';
import { NcrActionsDue } from '../components/NcrActionsDue';
import { FALLBACK_PLANT_CLOCK, formatPlantDateTime } from '@shared/time';
import { overviewPeriods, type OverviewItem } from '@shared/schemas/overview';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Select } from '@web/components/ui/Field';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';
import { Button } from '@web/components/ui/Button';


const familyLabels: Record<string, string> = { levelling: 'Levelling compounds', 'tile-adhesive': 'Tile adhesives', repair: 'Repair mortars' };
const periodLabel = (days: number) => (days === 182 ? 'Last 6 months' : `Last ${days} days`);

type Order = 'attention' | 'catalogue';

interface ProductGroup {
  key: string;
  title: string;
  items: OverviewItem[];
  score: number;
}

interface LineGroup {
  code: string;
  title: string;
  products: ProductGroup[];
  score: number;
}

/** Lines, then products, then characteristics; "needs attention" puts the most urgent first at each level. */
function group(items: OverviewItem[], order: Order, lineNames: Map<string, string>): LineGroup[] {
  const lines = new Map<string, LineGroup>();
  for (const item of items) {
    const code = item.lineCode ?? '–';
    let line = lines.get(code);
    if (!line) {
      line = { code, title: lineNames.get(code) ?? `Line ${code}`, products: [], score: 0 };
      lines.set(code, line);
    }
    let product = line.products.find((p) => p.key === item.productCode);
    if (!product) {
      product = { key: item.productCode, title: item.productName, items: [], score: 0 };
      line.products.push(product);
    }
    product.items.push(item);
    product.score = Math.max(product.score, item.attentionScore);
    line.score = Math.max(line.score, item.attentionScore);
  }
  const out = [...lines.values()];
  if (order === 'attention') {
    out.sort((a, b) => b.score - a.score);
    for (const line of out) {
      line.products.sort((a, b) => b.score - a.score);
      for (const p of line.products) p.items.sort((a, b) => b.attentionScore - a.attentionScore);
    }
  }
  return out;
}

export default function OverviewPage() {
  const [search, setSearch] = useSearchParams();
  const line = search.get('line') ?? '';
  const family = search.get('family') ?? '';
  const daysParam = Number(search.get('days'));
  const days = (overviewPeriods as readonly number[]).includes(daysParam) ? daysParam : 30;
  const order: Order = search.get('order') === 'catalogue' ? 'catalogue' : 'attention';
  const overview = useOverview({ line: line || undefined, family: family || undefined, days });
  const clock = usePlantClock().data ?? FALLBACK_PLANT_CLOCK;

  const set = (key: string, value: string) =>
    setSearch((s) => {
      if (value) s.set(key, value);
      else s.delete(key);
      return s;
    });

  const data = overview.data;
  const groups = useMemo(() => (data ? group(data.items, order, new Map(data.lines.map((l) => [l.code, l.name]))) : []), [data, order]);
  const counts = useMemo(() => {
    const items = data?.items ?? [];
    return {
      total: items.length,
      signal: items.filter((i) => i.controlState === 'signal').length,
      outside: items.filter((i) => i.latest?.outOfSpec).length,
      alarms: items.reduce((n, i) => n + i.openAlarms, 0),
    };
  }, [data]);

  return (
    <>
      <PageHeader
        title="Plant overview"
        description={
          data ? (
            <>
              Every active characteristic by line and product. Updated <span className="font-mono">{formatPlantDateTime(data.generatedAt, clock)}</span>; signals, out-of-specification lots and Cpk
              for the period from <span className="font-mono">{formatPlantDateTime(data.from, clock)}</span>.
            </>
          ) : (
            'Every active characteristic by line and product.'
          )
        }
      />

      <NcrActionsDue />

      <form className="mb-5 flex flex-wrap items-end gap-4" aria-label="Overview filters" onSubmit={(e) => e.preventDefault()}>
        <div className="space-y-1">
          <label htmlFor="overview-line" className="block text-sm font-medium text-zinc-800">
            Line
          </label>
          <Select id="overview-line" value={line} onChange={(e) => set('line', e.target.value)} className="w-56">
            <option value="">All lines</option>
            {(data?.lines ?? []).map((l) => (
              <option key={l.code} value={l.code}>
                {l.name}
              </option>
            ))}
          </Select>
        </div>
        <div className="space-y-1">
          <label htmlFor="overview-family" className="block text-sm font-medium text-zinc-800">
            Product family
          </label>
          <Select id="overview-family" value={family} onChange={(e) => set('family', e.target.value)} className="w-52">
            <option value="">All families</option>
            {(data?.families ?? []).map((f) => (
              <option key={f} value={f}>
                {familyLabels[f] ?? f}
              </option>
            ))}
          </Select>
        </div>
        <div className="space-y-1">
          <label htmlFor="overview-period" className="block text-sm font-medium text-zinc-800">
            Period
          </label>
          <Select id="overview-period" value={String(days)} onChange={(e) => set('days', e.target.value === '30' ? '' : e.target.value)} className="w-44">
            {overviewPeriods.map((d) => (
              <option key={d} value={d}>
                {periodLabel(d)}
              </option>
            ))}
          </Select>
        </div>
        <div className="space-y-1">
          <label htmlFor="overview-order" className="block text-sm font-medium text-zinc-800">
            Order
          </label>
          <Select id="overview-order" value={order} onChange={(e) => set('order', e.target.value === 'attention' ? '' : e.target.value)} className="w-56">
            <option value="attention">Needs attention first</option>
            <option value="catalogue">Line and product order</option>
          </Select>
        </div>
        {overview.isFetching && data && <p className="pb-2 text-sm text-zinc-600" role="status">Updating…</p>}
      </form>

      {overview.isError && !data ? (
        <ErrorState title="Could not load the overview" error={overview.error} onRetry={() => overview.refetch()} />
      ) : !data ? (
        <OverviewSkeleton />
      ) : data.items.length === 0 ? (
        <EmptyState title="No active characteristic matches these filters">
          Choose “All lines” and “All families”, or ask an administrator to set up the products and characteristics.
          <div className="mt-3">
            <Button variant="secondary" onClick={() => setSearch(new URLSearchParams())}>
              Clear the filters
            </Button>
          </div>
        </EmptyState>
      ) : (
        <div className="space-y-8">
          <p className="figures flex flex-wrap gap-x-6 gap-y-1 text-base text-zinc-800" data-testid="overview-counts">
            <span>
              <span className="font-mono font-semibold">{counts.total}</span> characteristics
            </span>
            <span>
              <span className="font-mono font-semibold">{counts.signal}</span> with run-rule signals
            </span>
            <span>
              <span className="font-mono font-semibold">{counts.outside}</span> latest lots outside specification
            </span>
            <span>
              <span className="font-mono font-semibold">{counts.alarms}</span> open alarms
            </span>
            <span>
              <span className="font-mono font-semibold">{data.heldLots.count}</span> {data.heldLots.count === 1 ? "lot" : "lots"} on hold
            </span>
          </p>
          <HeldLots held={data.heldLots} />
          {groups.map((g) => (
            <section key={g.code} aria-labelledby={`line-${g.code}`} className="space-y-4">
              <h2 id={`line-${g.code}`} className="text-xl font-semibold tracking-tight">
                {g.title}
              </h2>
              {g.products.map((p) => (
                <section key={p.key} aria-labelledby={`product-${p.key}`}>
                  <h3 id={`product-${p.key}`} className="mb-2 font-semibold text-zinc-700">
                    {p.title} <span className="font-mono text-sm font-normal text-zinc-500">{p.key}</span>
                  </h3>
                  <div className="grid gap-4 sm:grid-cols-2 xl:grid-cols-3 2xl:grid-cols-4">
                    {p.items.map((item) => (
                      <CharacteristicTile key={item.id} item={item} clock={clock} />
                    ))}
                  </div>
                </section>
              ))}
            </section>
          ))}
          <p className="text-sm text-zinc-500">
            Cpk against 1.33 and 1.00 as is common practice; the 95 % interval shows how far the estimate may be off. Control state is judged against the
            limits the nightly run uses.
          </p>
        </div>
      )}
    </>
  );
}

/** Tiles of the final size while the first answer loads. */
function OverviewSkeleton() {
  return (
    <div role="status" aria-label="Loading the overview…" className="grid gap-4 sm:grid-cols-2 xl:grid-cols-3 2xl:grid-cols-4">
      {Array.from({ length: 8 }, (_, i) => (
        <div key={i} className="h-64 animate-pulse rounded-lg border border-zinc-200 bg-white" />
      ))}
    </div>
  );
}
