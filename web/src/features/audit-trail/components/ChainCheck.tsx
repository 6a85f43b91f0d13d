import { Card } from '@web/components/ui/Card';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { PlantTime } from '@web/components/PlantTime';
import { useChainCheck } from '../api/audit-events';

/**
 * The chain check: every event's hash recomputed from its content and the event before it. It reads the
 * whole trail, so it runs on the button and shows that it is working meanwhile.
 */
export function ChainCheck() {
  const check = useChainCheck();
  const verdict = check.data;
  return (
    <Card title="Is the trail complete and unchanged?">
      <div className="space-y-3" data-testid="chain-check">
        <p className="text-sm text-zinc-600">
          Each event carries a hash of its content and of the event before it, so a changed, removed or inserted event breaks the chain from that point on.
        </p>
        <Button variant="secondary" onClick={() => void check.refetch()} busy={check.isFetching}>
          {verdict ? 'Check the chain again' : 'Check the chain'}
        </Button>
        {check.isFetching ? (
          <Loading label="Checking every link… a large trail takes a few seconds." />
        ) : check.isError ? (
          <ErrorState title="The check could not run" error={check.error} onRetry={() => void check.refetch()} />
        ) : verdict?.intact ? (
          <Alert tone="success">
            <p className="font-semibold">Intact: {verdict.events.toLocaleString('en-GB')} events, every link holds.</p>
            {verdict.head && (
              <p className="mt-1 text-sm [overflow-wrap:anywhere]">
                Newest link {verdict.head.seq}, written <PlantTime at={verdict.head.at} />, hash <span className="font-mono">{verdict.head.hash}</span>
              </p>
            )}
            <p className="mt-1 text-sm">
              Checked <PlantTime at={verdict.checkedAt} />.
            </p>
          </Alert>
        ) : verdict ? (
          <Alert tone="error">
            <p className="font-semibold">Broken{verdict.firstBroken?.seq != null ? ` at link ${verdict.firstBroken.seq}` : ''}: the trail was altered.</p>
            <p className="mt-1 text-sm">{verdict.firstBroken?.message}</p>
            <p className="mt-1 text-sm">
              {verdict.events.toLocaleString('en-GB')} events checked <PlantTime at={verdict.checkedAt} />.
            </p>
          </Alert>
        ) : null}
      </div>
    </Card>
  );
}
