import { Link } from 'react-router-dom';
import { FALLBACK_PLANT_CLOCK } from '@shared/time';
import { formatPlantDay } from '@web/lib/plant-days';
import { useNcrActionsDue } from '../api/ncr-actions-due';
import { usePlantClock } from '@web/lib/catalogue';
import { Badge } from '@web/components/ui/Badge';

/**
 * The NCR actions past due or due within two days, each linked to its NCR. Shown only when there are any:
 * the morning screen stays about the lines when nothing waits.
 */
export function NcrActionsDue() {
  const due = useNcrActionsDue();
  const clock = usePlantClock().data ?? FALLBACK_PLANT_CLOCK;
  if (!due.data || due.data.length === 0) return null;
  const overdue = due.data.filter((d) => d.action.overdue).length;
  return (
    <section aria-labelledby="ncr-actions-due" className="mb-6 rounded-lg border border-amber-300 bg-white px-5 py-4" data-testid="ncr-actions-due">
      <h2 id="ncr-actions-due" className="text-lg font-semibold">
        NCR actions {overdue > 0 ? 'overdue or due soon' : 'due soon'}
      </h2>
      <ul className="mt-2 divide-y divide-zinc-100">
        {due.data.map(({ ncrId, ncrNumber, ncrTitle, action }) => (
          <li key={action.id} className="flex flex-wrap items-baseline gap-x-3 gap-y-1 py-2" data-action={action.id}>
            {action.overdue ? <Badge tone="negative">Overdue</Badge> : <Badge tone="warning">Due soon</Badge>}
            <span className="figures text-sm text-zinc-700">due {formatPlantDay(action.dueDate, clock)}</span>
            <Link to={`/ncrs/${ncrId}`} className="font-mono text-accent-800 underline">
              {ncrNumber}
            </Link>
            <span className="min-w-0 flex-1 basis-64">
              {action.description} <span className="text-sm text-zinc-600">— {action.owner.name}; {ncrTitle}</span>
            </span>
          </li>
        ))}
      </ul>
    </section>
  );
}
