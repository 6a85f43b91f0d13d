import type { ProcessEvent } from '../api/process-events';
import { PlantTime } from '@web/components/PlantTime';

const th = 'border-b border-zinc-200 px-3 py-2.5 font-semibold whitespace-nowrap';

/** Events newest first, as the API lists them. */
export function ProcessEventList({ events }: { events: ProcessEvent[] }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-zinc-200 bg-white">
      <table className="w-full border-collapse text-left">
        <caption className="sr-only">Recorded events</caption>
        <thead className="bg-zinc-100/80 text-sm text-zinc-700">
          <tr>
            <th scope="col" className={th}>When</th>
            <th scope="col" className={th}>Event</th>
            <th scope="col" className={th}>Line</th>
            <th scope="col" className={th}>Product</th>
            <th scope="col" className={th}>Recorded by</th>
          </tr>
        </thead>
        <tbody>
          {events.map((e) => (
            <tr key={e.id} className="border-b border-zinc-100 align-top last:border-b-0">
              <td className="px-3 py-2 font-mono text-sm whitespace-nowrap"><PlantTime at={e.occurredAt} /></td>
              <th scope="row" className="min-w-44 px-3 py-2 text-left font-normal">
                <span className="block font-medium text-zinc-900">{e.title}</span>
                {e.description && <span className="block text-sm text-zinc-600 [overflow-wrap:anywhere]">{e.description}</span>}
              </th>
              {/* Codes stay whole; the words for "all of them" may wrap, so the table fits a tablet's width. */}
              <td className="px-3 py-2 text-sm">{e.lineCode ? <span className="font-mono whitespace-nowrap">{e.lineCode}</span> : <span className="text-zinc-600">Whole plant</span>}</td>
              <td className="px-3 py-2 text-sm">{e.productCode ? <span className="font-mono whitespace-nowrap">{e.productCode}</span> : <span className="text-zinc-600">Every product</span>}</td>
              <td className="px-3 py-2 text-sm text-zinc-700">{e.createdBy ?? '—'}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
