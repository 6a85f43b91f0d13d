import { PlainTable } from '@web/components/ui/Table';
import { formatFigure } from '@shared/figures';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { useLimitRevisions } from '../api/chart';
import { Badge } from '@web/components/ui/Badge';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

/** Every freeze of this chart's limits: who, when, why and from which baseline. Newest first. */
export function LimitRevisions({ characteristicId, decimals, clock }: { characteristicId: number; decimals: number; clock: PlantClock }) {
  const revisions = useLimitRevisions(characteristicId);
  if (revisions.isPending) return <Loading label="Loading the limit history…" />;
  if (revisions.isError) return <ErrorState title="Could not load the limit history" error={revisions.error} onRetry={() => revisions.refetch()} />;
  if (revisions.data.length === 0) {
    return <EmptyState title="Limits were never frozen">The chart uses trial limits from the points shown. A quality manager can freeze them from a stable baseline period.</EmptyState>;
  }
  return (
    <PlainTable caption="History of frozen control limits" headings={['Revision', 'Frozen', 'Baseline', 'Centre', 'LCL', 'UCL', 'σ within', 'Reason']}>
          {revisions.data.map((r) => (
            <tr key={r.id} className="border-b border-zinc-100 align-top last:border-b-0">
              <td className="px-3 py-2">
                <span className="font-mono">{r.revision}</span> {r.supersededAt === null ? <Badge tone="accent">In force</Badge> : <Badge>Replaced</Badge>}
              </td>
              <td className="px-3 py-2 text-sm">
                <span className="font-mono whitespace-nowrap">{formatPlantDateTime(r.createdAt, clock)}</span>
                <span className="block text-zinc-600">{r.createdByName ?? 'unknown user'}</span>
              </td>
              <td className="px-3 py-2 text-sm">
                <span className="font-mono whitespace-nowrap">{formatPlantDateTime(r.baselineFrom, clock)}</span> to{' '}
                <span className="font-mono whitespace-nowrap">{formatPlantDateTime(r.baselineTo, clock)}</span>
                <span className="block text-zinc-600">{r.baselinePoints} points kept</span>
              </td>
              <td className="px-3 py-2 text-right font-mono">{formatFigure(r.center, decimals + 1)}</td>
              <td className="px-3 py-2 text-right font-mono">{formatFigure(r.locationLcl, decimals + 1)}</td>
              <td className="px-3 py-2 text-right font-mono">{formatFigure(r.locationUcl, decimals + 1)}</td>
              <td className="px-3 py-2 text-right font-mono">{formatFigure(r.sigmaWithin, decimals + 2)}</td>
              <td className="px-3 py-2 text-sm">{r.reason}</td>
            </tr>
          ))}
    </PlainTable>
  );
}
