import { useParams } from 'react-router-dom';
import { plantTimeNote } from '@shared/time';
import { useNcr } from '../api/ncrs';
import { NcrStatusBadge, SeverityBadge } from '../components/Badges';
import { StatusSteps } from '../components/StatusSteps';
import { Particulars } from '../components/Particulars';
import { Containment } from '../components/Containment';
import { LinkedAlarms } from '../components/LinkedAlarms';
import { RootCause } from '../components/RootCause';
import { Actions } from '../components/Actions';
import { Dispositions } from '../components/Dispositions';
import { Attachments } from '../components/Attachments';
import { Approval } from '../components/Approval';
import { Closure } from '../components/Closure';
import { History } from '../components/History';
import { useMay } from '@web/app/permissions';
import { usePlantClock } from '@web/lib/catalogue';
import { NotFoundPage } from '@web/app/routes/NotFoundPage';
import { ApiError } from '@web/lib/http';
import { Button } from '@web/components/ui/Button';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';

/** /ncrs/:id: the whole NCR on one page, which prints as one A4 record (the print rules in styles.css). */
export default function NcrPage() {
  const { id } = useParams();
  const ncrId = /^\d{1,10}$/.test(id ?? '') ? Number(id) : 0;
  if (!ncrId) return <NotFoundPage />;
  return <NcrRecord key={ncrId} id={ncrId} />;
}

function NcrRecord({ id }: { id: number }) {
  const ncr = useNcr(id);
  const mayManage = useMay('ncr.manage');
  const mayRaise = useMay('ncr.raise');
  const clock = usePlantClock().data;

  if (ncr.isPending) return <Loading label="Loading the NCR…" />;
  if (ncr.isError) {
    if (ncr.error instanceof ApiError && ncr.error.status === 404) return <NotFoundPage />;
    return <ErrorState title="Could not load the NCR" error={ncr.error} onRetry={() => ncr.refetch()} />;
  }
  const n = ncr.data;
  return (
    <article className="print-record space-y-5" aria-labelledby="ncr-title">
      <header className="flex flex-wrap items-start justify-between gap-4">
        <div className="min-w-0">
          <p className="print-only hidden text-sm">Nonconformance report</p>
          <h1 id="ncr-title" className="text-2xl font-semibold tracking-tight text-zinc-900">
            <span className="font-mono">{n.number}</span> · {n.title}
          </h1>
          <div className="mt-2 flex flex-wrap items-center gap-2">
            <NcrStatusBadge status={n.status} />
            <SeverityBadge severity={n.severity} />
            {n.overdueActions > 0 && <span className="font-semibold text-red-800">{n.overdueActions} overdue action{n.overdueActions === 1 ? '' : 's'}</span>}
          </div>
        </div>
        <Button variant="secondary" className="print:hidden" onClick={() => window.print()}>
          Print
        </Button>
      </header>
      <StatusSteps ncr={n} mayManage={mayManage} />
      <Particulars ncr={n} mayManage={mayManage} />
      <Containment ncr={n} mayManage={mayManage} />
      <LinkedAlarms ncr={n} />
      <RootCause ncr={n} mayManage={mayManage} />
      <Actions ncr={n} mayManage={mayManage} mayRaise={mayRaise} />
      <Dispositions ncr={n} mayManage={mayManage} />
      <Attachments ncr={n} mayAttach={mayRaise && n.status !== 'closed'} />
      <Approval ncr={n} mayManage={mayManage} />
      <Closure ncr={n} mayManage={mayManage} />
      <History ncr={n} />
      {/* On paper there is no page footer to name the zone, so the record names it once. */}
      {clock && <p className="print-only hidden text-sm">{plantTimeNote(clock.timeZone)}.</p>}
    </article>
  );
}
