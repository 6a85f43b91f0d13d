import { Link } from 'react-router-dom';
import type { CharacteristicChart } from '@shared/schemas/charts';
import { formatFigure } from '@shared/figures';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { Button } from '@web/components/ui/Button';
import { lotPath } from '@web/lib/lots';
import { shiftName } from '@web/lib/chart-format';
import { ruleLabels, statisticNames } from '@shared/spc';

interface SelectedPointProps {
  chart: CharacteristicChart;
  index: number | null;
  clock: PlantClock;
  canChangeLimits: boolean;
  onOpenLot: (index: number) => void;
  onExclude: (index: number) => void;
  onInclude: (index: number) => void;
}

/** The selected point in words (also what a screen reader hears as the selection moves) and what can be done with it. */
export function SelectedPoint({ chart, index, clock, canChangeLimits, onOpenLot, onExclude, onInclude }: SelectedPointProps) {
  const p = index === null ? undefined : chart.points.find((x) => x.index === index);
  const { unit, decimals, chartType } = chart.characteristic;
  const names = statisticNames[chartType];
  return (
    <div className="min-h-20 rounded-md border border-zinc-200 bg-zinc-50 px-4 py-3" data-testid="selected-point">
      <div aria-live="polite">
        {!p ? (
          <p className="text-sm text-zinc-600">No point selected. Click a point or use the arrow keys on the chart.</p>
        ) : (
          <>
            <p className="font-medium">
              Lot <span className="font-mono">{p.lotNumber}</span> · <span className="font-mono">{formatPlantDateTime(p.producedAt, clock)}</span> ·{' '}
              {shiftName(p.shift)}
            </p>
            <p className="text-sm text-zinc-700">
              Values <span className="font-mono">{p.values.map((v) => formatFigure(v, decimals)).join(' · ')}</span> {unit}; {names.location}{' '}
              <span className="font-mono">{formatFigure(p.location, decimals + (p.n > 1 ? 1 : 0))}</span>
              {p.dispersion !== null && (
                <>
                  , {names.dispersion} <span className="font-mono">{formatFigure(p.dispersion, decimals + 1)}</span>
                </>
              )}
              {p.outOfSpec && '; outside the specification'}
              {p.excluded && `; excluded from the limits: ${p.exclusionReason ?? ''}`}
              {p.rules.length > 0 && `; breaks ${p.rules.map((r) => ruleLabels[r]).join(', ')}`}.
            </p>
          </>
        )}
      </div>
      {p && (
        <div className="mt-2 flex flex-wrap gap-2">
          <Button size="sm" variant="secondary" onClick={() => onOpenLot(p.index)}>
            Lot details
          </Button>
          <Link
            to={lotPath(p.lotNumber)}
            className="inline-flex h-8 items-center rounded-md border border-zinc-300 bg-white px-3 text-sm font-medium text-zinc-800 hover:bg-zinc-100"
          >
            Lot page
          </Link>
          {canChangeLimits &&
            (p.excluded ? (
              <Button size="sm" variant="secondary" onClick={() => onInclude(p.index)}>
                Take back into the limits…
              </Button>
            ) : (
              <Button size="sm" variant="secondary" onClick={() => onExclude(p.index)}>
                Exclude from the limits…
              </Button>
            ))}
        </div>
      )}
    </div>
  );
}
