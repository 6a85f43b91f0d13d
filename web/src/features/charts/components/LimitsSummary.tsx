import type { CharacteristicChart } from '@shared/schemas/charts';
import { formatFigure } from '@shared/figures';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { Badge } from '@web/components/ui/Badge';
import { statisticNames } from '@shared/spc';

function Figure({ label, value, testId }: { label: string; value: string; testId?: string }) {
  return (
    <div>
      <dt className="text-sm text-zinc-600">{label}</dt>
      <dd className="font-mono text-lg text-zinc-900" data-testid={testId}>
        {value}
      </dd>
    </div>
  );
}

/** Which limits the chart is judged against, their figures, and the specification beside them. */
export function LimitsSummary({ chart, clock }: { chart: CharacteristicChart; clock: PlantClock }) {
  const { limits, spec } = chart;
  const { decimals, unit, chartType, subgroupSize } = chart.characteristic;
  const names = statisticNames[chartType];
  // One decimal more than the points carry: a limit is an estimate, and an exclusion moves it by less than a reading's step.
  const loc = decimals + (subgroupSize > 1 ? 2 : 1);
  const disp = decimals + 2;
  const frozen = limits.source === 'frozen';

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2">
        {frozen ? <Badge tone="accent">Frozen limits</Badge> : <Badge tone="neutral">Trial limits</Badge>}
        <p className="text-sm text-zinc-700" data-testid="limits-source">
          {frozen
            ? `Frozen ${limits.frozenAt ? formatPlantDateTime(limits.frozenAt, clock) : ''}${limits.frozenBy ? ` by ${limits.frozenBy}` : ''} from the baseline ${limits.baselineFrom ? formatPlantDateTime(limits.baselineFrom, clock) : ''} to ${limits.baselineTo ? formatPlantDateTime(limits.baselineTo, clock) : ''}: ${limits.reason ?? ''}`
            : 'Estimated from every kept point shown (phase I). They move as points are added or excluded, until limits are frozen.'}
        </p>
      </div>
      {/* One number per cell, so that a figure never breaks over two lines at 1366 px or on a tablet. */}
      <dl className="grid grid-cols-2 gap-x-4 gap-y-2 sm:grid-cols-3 md:grid-cols-5 xl:grid-cols-9">
        <Figure label={`${names.location} centre line`} value={formatFigure(limits.location.center, loc)} testId="limit-center" />
        <Figure label="UCL" value={formatFigure(limits.location.ucl, loc)} testId="limit-ucl" />
        <Figure label="LCL" value={formatFigure(limits.location.lcl, loc)} testId="limit-lcl" />
        <Figure label="σ within" value={formatFigure(limits.sigmaWithin, disp)} />
        <Figure label={`${names.dispersion} centre line`} value={formatFigure(limits.dispersion.center, disp)} />
        <Figure label={`${names.dispersion} UCL`} value={formatFigure(limits.dispersion.ucl, disp)} />
        <Figure label="LSL" value={formatFigure(spec?.lsl, decimals)} />
        <Figure label="USL" value={formatFigure(spec?.usl, decimals)} />
        <Figure label="Target" value={formatFigure(spec?.target, decimals)} />
      </dl>
      <p className="text-sm text-zinc-500">Figures in {unit}. Specification revision {spec?.revision ?? '–'} in force now.</p>
    </div>
  );
}
