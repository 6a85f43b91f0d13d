import { useState } from 'react';
import { Link } from 'react-router-dom';
import { useCharacteristics, useLines, type Characteristic } from '@web/lib/catalogue';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Input } from '@web/components/ui/Field';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';
import { chartTypeLabels } from '@shared/spc';
import type { ChartType } from '@shared/spc';

type Listed = Characteristic & { chartType?: ChartType };

function groupByLineAndProduct(items: Listed[]) {
  const lines = new Map<string, Map<string, Listed[]>>();
  for (const c of items) {
    const line = c.lineCode ?? 'No line';
    const products = lines.get(line) ?? new Map<string, Listed[]>();
    lines.set(line, products);
    const product = `${c.productName} (${c.productCode})`;
    products.set(product, [...(products.get(product) ?? []), c]);
  }
  // Lines and products in the order people name them, whatever order the catalogue was entered in.
  return [...lines].sort(([a], [b]) => a.localeCompare(b)).map(([line, products]) => [line, [...products].sort(([a], [b]) => a.localeCompare(b))] as const);
}

/** Every characteristic with a control chart, by line and product, to pick one from. */
export default function ChartsIndexPage() {
  const characteristics = useCharacteristics();
  // Line names as the overview shows them ("Line 1 · levelling compounds"); the code alone until they load.
  const lineNames = new Map((useLines().data ?? []).map((l) => [l.code, l.name]));
  const [filter, setFilter] = useState('');

  const header = (
    <PageHeader
      title="Control charts"
      description="Pick a characteristic to see its control chart, run-rule signals, capability and limit history."
    />
  );
  if (characteristics.isPending) return <>{header}<Loading label="Loading the characteristics…" /></>;
  if (characteristics.isError) return <>{header}<ErrorState title="Could not load the characteristics" error={characteristics.error} onRetry={() => characteristics.refetch()} /></>;

  const needle = filter.trim().toLowerCase();
  const active = (characteristics.data as Listed[]).filter((c) => c.active);
  const shown = active.filter((c) => !needle || [c.name, c.code, c.productName, c.lineCode ?? ''].some((t) => t.toLowerCase().includes(needle)));
  const groups = groupByLineAndProduct(shown);

  return (
    <>
      {header}
      <div className="mb-4 flex flex-wrap items-center gap-3">
        <label htmlFor="chart-filter" className="text-sm font-medium text-zinc-800">
          Filter
        </label>
        <Input id="chart-filter" type="search" placeholder="Product, characteristic or code" value={filter} onChange={(e) => setFilter(e.target.value)} className="max-w-xs" />
        <p className="figures text-sm text-zinc-600" aria-live="polite">
          {shown.length === active.length ? `${active.length} characteristics` : `${shown.length} of ${active.length} characteristics`}
        </p>
      </div>
      {active.length === 0 ? (
        <EmptyState title="No characteristic is set up yet">An administrator adds products and their characteristics under Products, lines &amp; characteristics.</EmptyState>
      ) : shown.length === 0 ? (
        <EmptyState title="No characteristic matches the filter">Clear the filter to see them all.</EmptyState>
      ) : (
        <div className="space-y-6">
          {groups.map(([line, products]) => (
            <section key={line} aria-labelledby={`line-${line}`}>
              <h2 id={`line-${line}`} className="mb-2 text-lg font-semibold">
                {lineNames.get(line) ?? 'Line'} <span className="font-mono text-base font-normal text-zinc-500">{line}</span>
              </h2>
              <div className="grid gap-4 lg:grid-cols-2">
                {products.map(([product, items]) => (
                  <div key={product} className="rounded-lg border border-zinc-200 bg-white">
                    <h3 className="border-b border-zinc-200 px-4 py-2.5 font-medium">{product}</h3>
                    <ul className="divide-y divide-zinc-100">
                      {items.map((c) => (
                        <li key={c.id}>
                          <Link to={`/charts/${c.id}`} className="flex items-baseline justify-between gap-3 px-4 py-2 hover:bg-zinc-50 focus-visible:outline-2 focus-visible:outline-accent-600">
                            <span className="text-accent-800">{c.name.replace(`${c.productName} · `, '')}</span>
                            <span className="shrink-0 text-sm text-zinc-500">
                              {c.chartType ? chartTypeLabels[c.chartType] : `subgroups of ${c.subgroupSize}`} · <span className="font-mono">{c.unit}</span>
                            </span>
                          </Link>
                        </li>
                      ))}
                    </ul>
                  </div>
                ))}
              </div>
            </section>
          ))}
        </div>
      )}
    </>
  );
}
