import type { RunSummary } from '../api/runs';

/** Characteristics done (and failed) of all in the run, as a bar and in figures. */
export function RunProgress({ run }: { run: RunSummary }) {
  const total = Math.max(1, run.characteristics);
  const done = (100 * run.done) / total;
  const failed = (100 * run.failed) / total;
  return (
    <div className="min-w-28">
      <div
        className="flex h-2 overflow-hidden rounded-full bg-zinc-200"
        role="progressbar"
        aria-label={`Run ${run.id} progress`}
        aria-valuemin={0}
        aria-valuemax={run.characteristics}
        aria-valuenow={run.done + run.failed}
      >
        <div className="bg-accent-600" style={{ width: `${done}%` }} />
        <div className="bg-red-600" style={{ width: `${failed}%` }} />
      </div>
      <p className="figures mt-1 text-sm text-zinc-600">
        {run.done} of {run.characteristics} done{run.failed ? `, ${run.failed} failed` : ''}
        {run.running ? `, ${run.running} in progress` : ''}
      </p>
    </div>
  );
}
