import { Link } from 'react-router-dom';
import { cpkFigure, type OverviewItem } from '@shared/schemas/overview';
import { Badge } from '@web/components/ui/Badge';
import { formatFigure } from '@shared/figures';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { lotPath } from '@web/lib/lots';
import { TrendLine } from './TrendLine';

function ControlBadge({ state }: { state: OverviewItem['controlState'] }) {
  if (state === 'signal') return <Badge tone="negative">▲ Signal</Badge>;
  if (state === 'alarms-open') return <Badge tone="warning">Alarms open</Badge>;
  if (state === 'in-control') return <Badge tone="positive">In control</Badge>;
  return <Badge tone="neutral">Not enough data</Badge>;
}

/** One characteristic at a glance: latest result against the specification, control state, alarms, Cpk and trend. */
export function CharacteristicTile({ item, clock }: { item: OverviewItem; clock: PlantClock }) {
  const shortName = item.name.startsWith(`${item.productName} · `) ? item.name.slice(item.productName.length + 3) : item.name;
  // A mean of several replicates carries one decimal more than a single result, as on the chart.
  const decimals = item.decimals + (item.latest && item.latest.n > 1 ? 1 : 0);
  const tooFew = !item.capabilityEnough && item.spec !== null && (item.spec.lsl !== null || item.spec.usl !== null);
  return (
    <article className="flex flex-col gap-2 rounded-lg border border-zinc-200 bg-white p-4 shadow-xs" aria-labelledby={`tile-${item.id}`} data-testid={`tile-${item.code}`}>
      <div className="flex items-start justify-between gap-3">
        <h3 id={`tile-${item.id}`} className="font-medium leading-snug">
          <Link to={`/charts/${item.id}`} className="text-accent-800 underline-offset-2 hover:underline focus-visible:outline-2 focus-visible:outline-accent-600">
            {shortName}
          </Link>
        </h3>
        <ControlBadge state={item.controlState} />
      </div>
      {item.latest ? (
        <div className="flex flex-wrap items-baseline justify-between gap-x-3 gap-y-1">
          <p>
            <span className="font-mono text-2xl font-medium">{formatFigure(item.latest.location, decimals)}</span> <span className="text-zinc-600">{item.unit}</span>
          </p>
          {item.spec && (item.spec.lsl !== null || item.spec.usl !== null) ? (
            item.latest.outOfSpec ? <Badge tone="warning">◆ Outside specification</Badge> : <Badge tone="positive">Within specification</Badge>
          ) : (
            <Badge>No specification</Badge>
          )}
          <p className="w-full text-sm text-zinc-600">
            Latest lot{' '}
            <Link to={lotPath(item.latest.lotNumber)} className="font-mono text-accent-800 underline underline-offset-2">
              {item.latest.lotNumber}
            </Link>
            , <span className="font-mono">{formatPlantDateTime(item.latest.producedAt, clock)}</span>
          </p>
        </div>
      ) : (
        <p className="text-zinc-600">No result recorded yet.</p>
      )}
      {/* A label that wraps in a narrow tile must not lift its figure above the others. */}
      <dl className="grid grid-cols-3 gap-2 text-sm">
        <div className="flex flex-col">
          <dt className="text-zinc-600">Cpk</dt>
          <dd className="mt-auto font-mono text-base" data-testid="cpk-value">
            {tooFew ? <span className="font-sans text-sm text-zinc-600">Not enough data</span> : item.cpk === null ? '–' : cpkFigure(item.cpk)}
            {item.capabilityPreliminary && item.cpk !== null && <span className="font-sans text-xs text-zinc-500"> prelim.</span>}
          </dd>
        </div>
        <div className="flex flex-col">
          <dt className="text-zinc-600">95 % interval</dt>
          <dd className="mt-auto font-mono" data-testid="cpk-interval">
            {tooFew ? (
              <span className="font-sans text-sm text-zinc-600">Not enough data</span>
            ) : item.cpkCi95 ? (
              `${formatFigure(item.cpkCi95[0], 2)}–${formatFigure(item.cpkCi95[1], 2)}`
            ) : (
              '–'
            )}
          </dd>
        </div>
        <div className="flex flex-col">
          <dt className="text-zinc-600">Open alarms</dt>
          <dd className="mt-auto font-mono text-base">{item.openAlarms}</dd>
        </div>
      </dl>
      <TrendLine item={item} />
      {item.attention.length > 0 && (
        <ul className="space-y-0.5 border-t border-zinc-100 pt-2 text-sm text-zinc-800" aria-label="Needs attention because">
          {item.attention.map((a) => (
            <li key={a}>• {a}</li>
          ))}
        </ul>
      )}
    </article>
  );
}
