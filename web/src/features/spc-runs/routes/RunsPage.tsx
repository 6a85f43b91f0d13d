import { PlainTable } from '@web/components/ui/Table';
import { Fragment, useState } from 'react';
import { isActive, useRuns, useStartRun, type RunSummary } from '../api/runs';
import { RunProgress } from '../components/RunProgress';
import { RunDetails } from '../components/RunDetails';
import { useMay } from '@web/app/permissions';
import { errorMessage } from '@web/lib/http';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Button } from '@web/components/ui/Button';
import { Badge } from '@web/components/ui/Badge';
import { Alert } from '@web/components/ui/Alert';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';
import { PlantTime } from '@web/components/PlantTime';

const statusWords: Record<RunSummary['status'], { label: string; tone: 'neutral' | 'accent' | 'positive' | 'negative' }> = {
  queued: { label: 'Waiting', tone: 'neutral' },
  running: { label: 'Running', tone: 'accent' },
  succeeded: { label: 'Finished', tone: 'positive' },
  failed: { label: 'Finished with failures', tone: 'negative' },
};

const triggerWords: Record<RunSummary['trigger'], string> = {
  schedule: 'Nightly schedule',
  manual: 'Started by hand',
  // Uploads and lots entered by hand both start this run.
  upload: 'After new results were stored',
  void: 'After a voided upload',
  correction: 'After a corrected result',
  limits: 'After a point was excluded or limits frozen',
  settings: 'After a chart type, subgroup size or rule set changed',
  first: 'First run over the stored history',
};


function duration(run: RunSummary): string {
  if (!run.startedAt) return '—';
  const end = run.finishedAt ? Date.parse(run.finishedAt) : Date.now();
  const s = Math.max(0, (end - Date.parse(run.startedAt)) / 1000);
  return s < 60 ? `${s.toFixed(1)} s` : `${Math.floor(s / 60)} min ${Math.round(s % 60)} s`;
}

export default function RunsPage() {
  const runs = useRuns();
  const start = useStartRun();
  const [open, setOpen] = useState<number | null>(null);
  const mayStart = useMay('spc-run.start');
  const busy = runs.data?.some(isActive) ?? false;

  return (
    <>
      <PageHeader
        title="SPC runs"
        description="Every night, and whenever new results are stored, Prismline recomputes the control charts, run-rule signals and capability of each characteristic and raises alarms. This page follows each run live."
        actions={
          mayStart && (
            <Button busy={start.isPending} onClick={() => start.mutate(undefined)}>
              Start a full run now
            </Button>
          )
        }
      />
      <div className="space-y-4">
        {start.isError && <Alert tone="error">{errorMessage(start.error)}</Alert>}
        {start.isSuccess && <Alert tone="success">Run {start.data.id} has been queued.{busy ? ' Its progress shows below.' : ''}</Alert>}
        {runs.isPending ? (
          <Loading label="Loading runs…" />
        ) : runs.isError ? (
          <ErrorState title="Could not load the runs" error={runs.error} onRetry={() => runs.refetch()} />
        ) : runs.data.length === 0 ? (
          <EmptyState title="No run yet">The first nightly run starts at the time set for the plant{mayStart ? ', or start one now' : ''}.</EmptyState>
        ) : (
          <PlainTable caption="SPC runs, newest first" headings={['Run', 'Why', 'Status', 'Progress', 'Alarms', 'Started, took']}>
                {runs.data.map((run) => (
                  <Fragment key={run.id}>
                    <tr className="border-b border-zinc-100 align-top" data-run={run.id}>
                      <td className="px-3 py-2 font-mono">{run.id}</td>
                      <td className="px-3 py-2">
                        <span className="block">{triggerWords[run.trigger]}</span>
                        <span className="block text-sm text-zinc-600 [overflow-wrap:anywhere]">
                          {run.kind === 'full' ? 'All characteristics' : `${run.characteristics} characteristic${run.characteristics === 1 ? '' : 's'}`}
                          {run.requestedBy ? ` · ${run.requestedBy}` : ''}
                        </span>
                      </td>
                      {/* The details button sits under the status it explains: a column of its own pushed a failed run's row past a tablet's width. */}
                      <td className="space-y-1.5 px-3 py-2">
                        <Badge tone={statusWords[run.status].tone}>{statusWords[run.status].label}</Badge>
                        {(run.failed > 0 || isActive(run)) && (
                          <div>
                            <Button variant="quiet" size="sm" aria-expanded={open === run.id} onClick={() => setOpen(open === run.id ? null : run.id)}>
                              {open === run.id ? 'Hide details' : run.failed ? 'Show failures' : 'Details'}
                            </Button>
                          </div>
                        )}
                      </td>
                      <td className="px-3 py-2">
                        <RunProgress run={run} />
                      </td>
                      <td className="figures px-3 py-2 text-sm">
                        {run.alarmsRaised} raised
                        {run.alarmsResolved ? <span className="block text-zinc-600">{run.alarmsResolved} resolved by changed data</span> : null}
                      </td>
                      {/* Start and duration share a column, so the table fits a tablet's width. */}
                      <td className="figures px-3 py-2 text-sm whitespace-nowrap">
                        <PlantTime at={run.startedAt ?? run.createdAt} className="block" />
                        <span className="block text-zinc-600">{duration(run)}</span>
                      </td>
                    </tr>
                    {open === run.id && (
                      <tr className="border-b border-zinc-100 bg-zinc-50">
                        <td colSpan={6} className="px-5 py-3">
                          <RunDetails id={run.id} />
                        </td>
                      </tr>
                    )}
                  </Fragment>
                ))}
          </PlainTable>
        )}
      </div>
    </>
  );
}
