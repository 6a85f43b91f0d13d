import { useRun } from '../api/runs';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';

/** Which characteristics failed and why, and which wait for another attempt. */
export function RunDetails({ id }: { id: number }) {
  const run = useRun(id);
  if (run.isPending) return <Loading label="Loading the run…" />;
  if (run.isError) return <ErrorState title="Could not load the run" error={run.error} onRetry={() => run.refetch()} />;
  const { failures, retrying } = run.data;
  if (!failures.length && !retrying.length) return <p className="text-sm text-zinc-600">No characteristic has failed in this run.</p>;
  return (
    <div className="space-y-3 text-sm">
      {failures.length > 0 && (
        <div>
          <h3 className="font-semibold text-red-800">Failed after every attempt</h3>
          <ul className="mt-1 space-y-1">
            {failures.map((f) => (
              <li key={f.characteristicId}>
                <span className="font-mono">{f.characteristicCode}</span> — {f.attempts} attempt{f.attempts === 1 ? '' : 's'}: <span className="[overflow-wrap:anywhere]">{f.error}</span>
              </li>
            ))}
          </ul>
        </div>
      )}
      {retrying.length > 0 && (
        <div>
          <h3 className="font-semibold text-amber-900">Waiting for another attempt</h3>
          <ul className="mt-1 space-y-1">
            {retrying.map((f) => (
              <li key={f.characteristicId}>
                <span className="font-mono">{f.characteristicCode}</span> — attempt {f.attempts} failed: <span className="[overflow-wrap:anywhere]">{f.error}</span>
              </li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}
