import { useDeleteSubscription, useScope, useSubscriptions, useUpdateSubscription, type Subscription } from '../api/subscriptions';
import { AddSubscriptionForm } from '../components/AddSubscriptionForm';
import { useSignedInUser } from '@web/lib/session';
import { errorMessage } from '@web/lib/http';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Card } from '@web/components/ui/Card';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

function Row({ s }: { s: Subscription }) {
  const update = useUpdateSubscription();
  const remove = useDeleteSubscription();
  const what = s.lineId !== null ? `Line ${s.lineCode} · ${s.lineName}` : `Product ${s.productCode} · ${s.productName}`;
  const toggle = (key: 'immediate' | 'digest', value: boolean) => update.mutate({ id: s.id, [key]: value });
  return (
    <tr className="border-b border-zinc-100" data-subscription={s.id}>
      <td className="px-3 py-2">{what}</td>
      <td className="px-3 py-2">
        <input type="checkbox" aria-label={`At once, ${what}`} checked={s.immediate} disabled={update.isPending || (s.immediate && !s.digest)} onChange={(e) => toggle('immediate', e.target.checked)} />
      </td>
      <td className="px-3 py-2">
        <input type="checkbox" aria-label={`Morning digest, ${what}`} checked={s.digest} disabled={update.isPending || (s.digest && !s.immediate)} onChange={(e) => toggle('digest', e.target.checked)} />
      </td>
      <td className="px-3 py-2">
        <Button variant="quiet" size="sm" busy={remove.isPending} onClick={() => remove.mutate(s.id)}>
          Unsubscribe
        </Button>
        {(update.isError || remove.isError) && <p className="text-sm text-red-700">{errorMessage(update.error ?? remove.error)}</p>}
      </td>
    </tr>
  );
}

export default function SubscriptionsPage() {
  const me = useSignedInUser();
  const subs = useSubscriptions();
  const scope = useScope();
  return (
    <>
      <PageHeader
        title="Alerts by e-mail"
        description={`Which alarms reach ${me.email}: at once when a result is out of specification or a point lies beyond a control limit, and a morning digest of the night's new alarms.`}
      />
      <div className="grid gap-4 lg:grid-cols-[2fr_1fr]">
        <Card title="Your subscriptions">
          {subs.isPending ? (
            <Loading label="Loading subscriptions…" />
          ) : subs.isError ? (
            <ErrorState title="Could not load your subscriptions" error={subs.error} onRetry={() => subs.refetch()} />
          ) : subs.data.length === 0 ? (
            <EmptyState title="You receive no alarm e-mails">Subscribe to a product line or a product.</EmptyState>
          ) : (
            <table className="w-full border-collapse text-left">
              <caption className="sr-only">Your subscriptions</caption>
              <thead className="text-sm text-zinc-700">
                <tr>
                  {['Line or product', 'At once', 'Morning digest', ''].map((h) => (
                    <th key={h} scope="col" className="border-b border-zinc-200 px-3 py-2 font-semibold">
                      {h}
                    </th>
                  ))}
                </tr>
              </thead>
              <tbody>
                {subs.data.map((s) => (
                  <Row key={s.id} s={s} />
                ))}
              </tbody>
            </table>
          )}
        </Card>
        <Card title="Subscribe">
          {scope.isPending ? <Loading /> : scope.isError ? <Alert tone="error">{errorMessage(scope.error)}</Alert> : <AddSubscriptionForm scope={scope.data} />}
        </Card>
      </div>
    </>
  );
}
