import { useState } from 'react';
import { Link } from 'react-router-dom';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import type { CharacteristicChart, ChartViolation } from '@shared/schemas/charts';
import { Button } from '@web/components/ui/Button';
import { ruleLabels, statisticNames } from '@shared/spc';

const FIRST = 12;

/** The points that break a run rule, newest first, each rule in words and a way to see it on the chart. */
export function SignalList({ chart, clock, onReveal }: { chart: CharacteristicChart; clock: PlantClock; onReveal: (index: number) => void }) {
  const [all, setAll] = useState(false);
  const names = statisticNames[chart.characteristic.chartType];
  const byPoint = new Map<number, ChartViolation[]>();
  for (const v of chart.violations) byPoint.set(v.index, [...(byPoint.get(v.index) ?? []), v]);
  const indices = [...byPoint.keys()].sort((a, b) => b - a);
  if (indices.length === 0) {
    return <p className="text-zinc-700">No point breaks a run rule in this period: the process shows no special cause against these limits.</p>;
  }
  const shown = all ? indices : indices.slice(0, FIRST);
  const pointOf = new Map(chart.points.map((p) => [p.index, p]));
  return (
    <div className="space-y-3">
      <p className="figures text-sm text-zinc-700" data-testid="signal-count">
        {chart.violations.length} signal{chart.violations.length === 1 ? '' : 's'} at {indices.length} point{indices.length === 1 ? '' : 's'}, newest first.
      </p>
      <ul className="divide-y divide-zinc-100 rounded-md border border-zinc-200" aria-label="Run-rule signals">
        {shown.map((index) => {
          const p = pointOf.get(index);
          return (
            <li key={index} className="flex flex-wrap items-start justify-between gap-3 px-3 py-2">
              <div className="min-w-0 flex-1">
                <p className="text-sm">
                  {p && (
                    <>
                      <span className="font-medium">
                        Lot <span className="font-mono">{p.lotNumber}</span>
                      </span>{' '}
                      · <span className="font-mono">{formatPlantDateTime(p.producedAt, clock)}</span>
                    </>
                  )}
                </p>
                <ul className="mt-0.5 space-y-0.5 text-sm text-zinc-700">
                  {byPoint.get(index)!.map((v) => (
                    <li key={v.rule + v.chart}>
                      <span aria-hidden="true" className="text-red-700">▲ </span>
                      <span className="font-medium">{ruleLabels[v.rule]}</span> ({v.chart === 'location' ? names.location : names.dispersion} chart): {v.description}
                    </li>
                  ))}
                </ul>
              </div>
              <div className="flex flex-wrap items-center gap-2">
                {p && (
                  // The alarms raised at this lot, in every status, where they are triaged.
                  <Link
                    className="text-sm text-accent-800 underline underline-offset-2"
                    to={`/alarms?${new URLSearchParams({ characteristic: String(chart.characteristic.id), q: p.lotNumber, status: 'all' })}`}
                    aria-label={`Alarms of lot ${p.lotNumber}`}
                  >
                    Alarms
                  </Link>
                )}
                <Button size="sm" variant="secondary" onClick={() => onReveal(index)} aria-label={`Show lot ${pointOf.get(index)?.lotNumber ?? ''} on the chart`}>
                  Show on chart
                </Button>
              </div>
            </li>
          );
        })}
      </ul>
      {indices.length > FIRST && (
        <Button variant="quiet" size="sm" onClick={() => setAll((v) => !v)}>
          {all ? `Show the newest ${FIRST} only` : `Show all ${indices.length} points with signals`}
        </Button>
      )}
    </div>
  );
}
