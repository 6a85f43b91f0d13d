import { useState } from 'react';
import { ncrStatuses, ncrStatusWords, ncrStepNeedsReason, type NcrStatus, type NcrView } from '@shared/schemas/ncrs';
import { useMoveNcr } from '../api/ncrs';
import { WriteError } from './Section';
import { Button } from '@web/components/ui/Button';
import { Dialog } from '@web/components/ui/Dialog';
import { TextArea } from '@web/components/ui/TextArea';
import { cx } from '@web/components/ui/cx';

const stepButton: Record<string, string> = {
  'open>investigating': 'Start the investigation',
  'investigating>actions-pending': 'Actions decided',
  'actions-pending>investigating': 'Back to investigating',
  'actions-pending>closed': 'Close the NCR',
  'closed>open': 'Reopen',
};

/** Where the NCR stands among its states, and the steps a manager may take from here. */
export function StatusSteps({ ncr, mayManage }: { ncr: NcrView; mayManage: boolean }) {
  const move = useMoveNcr(ncr.id);
  const [asking, setAsking] = useState<NcrStatus | null>(null);
  const [reason, setReason] = useState('');
  const at = ncrStatuses.indexOf(ncr.status);

  const step = (to: NcrStatus) => {
    if (ncrStepNeedsReason(ncr.status, to)) {
      setReason('');
      setAsking(to);
    } else move.mutate({ to });
  };

  return (
    <div className="space-y-3">
      <ol aria-label="States of the NCR" className="flex flex-wrap gap-2">
        {ncrStatuses.map((s, i) => (
          <li
            key={s}
            aria-current={s === ncr.status ? 'step' : undefined}
            className={cx(
              'rounded-md border px-3 py-1.5 text-sm font-medium',
              s === ncr.status ? 'border-accent-700 bg-accent-700 text-white' : i < at ? 'border-accent-200 bg-accent-50 text-accent-800' : 'border-zinc-300 text-zinc-600',
            )}
          >
            <span className="figures mr-1">{i + 1}.</span>
            {ncrStatusWords[s]}
          </li>
        ))}
      </ol>
      {mayManage && ncr.allowedTransitions.length > 0 && (
        <div role="group" className="flex flex-wrap gap-2 print:hidden" aria-label="Next steps">
          {ncr.allowedTransitions.map((to) => (
            <Button key={to} size="sm" variant={ncrStatuses.indexOf(to) > at ? 'primary' : 'secondary'} busy={move.isPending && move.variables?.to === to} onClick={() => step(to)}>
              {stepButton[`${ncr.status}>${to}`] ?? `Move to ${ncrStatusWords[to].toLowerCase()}`}
            </Button>
          ))}
        </div>
      )}
      {ncr.allowedTransitions.includes('closed') && ncr.closingBlockers.length > 0 && (
        <div className="rounded-md border border-amber-300 bg-amber-50 px-4 py-3 text-amber-950" data-testid="closing-blockers">
          <p className="font-medium">Before it can be closed:</p>
          <ul className="mt-1 list-disc pl-5">
            {ncr.closingBlockers.map((b) => (
              <li key={b}>{b}</li>
            ))}
          </ul>
        </div>
      )}
      {move.isError && !asking && <WriteError error={move.error} />}
      {asking && (
        <Dialog title={stepButton[`${ncr.status}>${asking}`] ?? ncrStatusWords[asking]} onClose={() => setAsking(null)}>
          <form
            className="space-y-3"
            onSubmit={(e) => {
              e.preventDefault();
              move.mutate({ to: asking, reason }, { onSuccess: () => setAsking(null) });
            }}
          >
            <label htmlFor="ncr-step-reason" className="block text-sm font-medium text-zinc-800">
              Reason
            </label>
            <TextArea id="ncr-step-reason" rows={4} required minLength={5} maxLength={2000} value={reason} onChange={(e) => setReason(e.target.value)} />
            <p className="text-sm text-zinc-600">
              {asking === 'open' ? 'What shows the nonconformance is not settled after all.' : 'Why the root cause or the actions must be looked at again.'} It goes into the NCR’s history.
            </p>
            {move.isError && <WriteError error={move.error} />}
            <div className="flex justify-end gap-2">
              <Button variant="secondary" onClick={() => setAsking(null)}>
                Cancel
              </Button>
              <Button type="submit" busy={move.isPending}>
                {stepButton[`${ncr.status}>${asking}`] ?? 'Go'}
              </Button>
            </div>
          </form>
        </Dialog>
      )}
    </div>
  );
}
