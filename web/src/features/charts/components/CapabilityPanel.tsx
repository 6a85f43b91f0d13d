import { useMemo } from 'react';
import { formatFigure } from '@shared/figures';
// The ES module build of the core component: the CommonJS one under lib/ reaches the bundle as a module object.
import ReactEChartsCore from 'echarts-for-react/esm/core';
import { echarts } from '../lib/echarts';
import { buildCapabilityOption } from '../lib/capability-option';
import { indexFigure } from '@web/lib/chart-format';
import type { CharacteristicChart } from '@shared/schemas/charts';
import type { Interval } from '@shared/spc';
import { Badge } from '@web/components/ui/Badge';
import { EmptyState } from '@web/components/ui/EmptyState';

/** The values capability is computed from: every replicate of the kept points, or each lot's result on an I–MR chart. */
export function capabilityValues(chart: CharacteristicChart): number[] {
  const imr = chart.characteristic.chartType === 'imr';
  const out: number[] = [];
  for (const p of chart.points) {
    if (p.excluded) continue;
    if (imr) out.push(p.location);
    else out.push(...p.values);
  }
  return out;
}

const interval = (ci: Interval | null) => (ci ? `${indexFigure(ci[0])} to ${indexFigure(ci[1])}` : '–');
const ppm = (value: number | null) => (value === null ? '–' : value < 1 && value > 0 ? '< 1' : Math.round(value).toLocaleString('en-GB'));

export function CapabilityPanel({ chart }: { chart: CharacteristicChart }) {
  const cap = chart.capability;
  const { unit, decimals } = chart.characteristic;
  const values = useMemo(() => capabilityValues(chart), [chart]);
  const option = useMemo(() => (cap ? buildCapabilityOption(values, cap, unit, decimals) : null), [values, cap, unit, decimals]);

  if (!cap || !option) {
    return <EmptyState title="No capability yet">Capability needs kept results of this characteristic; upload results or take excluded points back in.</EmptyState>;
  }

  const normality = cap.normality;
  const rows: { name: string; what: string; value: number | null; ci: Interval | null }[] = [
    { name: 'Cp', what: 'potential, sigma within', value: cap.cp, ci: cap.cpCi95 },
    { name: 'Cpk', what: 'actual, sigma within', value: cap.cpk, ci: cap.cpkCi95 },
    { name: 'Pp', what: 'potential, overall sigma', value: cap.pp, ci: cap.ppCi95 },
    { name: 'Ppk', what: 'actual, overall sigma', value: cap.ppk, ci: cap.ppkCi95 },
  ];

  return (
    <div className="grid gap-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]" data-testid="capability-panel">
      <div>
        <div className="h-72" role="img" aria-label={`Histogram of ${values.length} values with the fitted normal curve and the specification limits`}>
          <ReactEChartsCore echarts={echarts} option={option} notMerge lazyUpdate style={{ height: '100%', width: '100%' }} />
        </div>
        <p className="mt-1 text-sm text-zinc-600">
          Bars: kept values. Solid curve: normal distribution with the mean and the overall standard deviation.
        </p>
      </div>
      <div className="space-y-4">
        <div className="flex flex-wrap items-center gap-2">
          {cap.preliminary ? <Badge tone="warning">Preliminary</Badge> : <Badge tone="neutral">{cap.subgroupCount} subgroups</Badge>}
          <span className="figures text-sm text-zinc-600">
            n = <span className="font-mono">{cap.n}</span> · mean <span className="font-mono">{formatFigure(cap.mean, decimals + 1)}</span> · σ within{' '}
            <span className="font-mono">{formatFigure(cap.sigmaWithin, decimals + 2)}</span> · σ overall <span className="font-mono">{formatFigure(cap.sigmaOverall, decimals + 2)}</span> {unit}
          </span>
        </div>
        <table className="w-full text-left">
          <caption className="sr-only">Capability and performance indices with 95 % confidence intervals</caption>
          <thead className="text-sm text-zinc-600">
            <tr>
              <th scope="col" className="py-1 font-semibold">Index</th>
              <th scope="col" className="py-1 text-right font-semibold">Estimate</th>
              <th scope="col" className="py-1 text-right font-semibold">95 % interval</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.name} className="border-t border-zinc-100">
                <th scope="row" className="py-1.5 font-medium">
                  {r.name} <span className="text-sm font-normal text-zinc-500">{r.what}</span>
                </th>
                <td className="py-1.5 text-right font-mono text-lg" data-testid={`index-${r.name}`}>
                  {indexFigure(r.value)}
                </td>
                <td className="py-1.5 text-right font-mono text-sm text-zinc-700">{interval(r.ci)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
          <dt className="text-zinc-600">Expected outside, overall</dt>
          <dd className="text-right font-mono">{ppm(cap.ppmExpected)} ppm</dd>
          <dt className="text-zinc-600">Expected outside, within</dt>
          <dd className="text-right font-mono">{ppm(cap.ppmExpectedWithin)} ppm</dd>
          <dt className="text-zinc-600">Observed outside</dt>
          <dd className="text-right font-mono">{ppm(cap.ppmObserved)} ppm</dd>
          <dt className="text-zinc-600">Normality (Anderson–Darling)</dt>
          <dd className="text-right">
            {normality?.p == null ? (
              'not checked'
            ) : (
              <>
                <span className="font-mono">
                  A² {formatFigure(normality.statistic, 3)}, p {normality.p < 0.001 ? '< 0.001' : formatFigure(normality.p, 3)}
                </span>{' '}
                — {normality.p < 0.05 ? 'does not look normal' : 'no evidence against normal'}
              </>
            )}
          </dd>
        </dl>
        {cap.notes.length > 0 && (
          <ul className="space-y-1.5 rounded-md border border-amber-200 bg-amber-50 px-4 py-3 text-sm text-amber-950" aria-label="Cautions for reading the indices">
            {cap.notes.map((note) => (
              <li key={note.code + note.message}>{note.message}</li>
            ))}
          </ul>
        )}
      </div>
    </div>
  );
}
