import { Link } from 'react-router-dom';
import { holdSourceWords } from '@shared/schemas/lots';
import type { Overview } from '@shared/schemas/overview';
import { lotPath } from '@web/lib/lots';
import { PlantTime } from '@web/components/PlantTime';

/** Lots waiting for a decision, oldest hold first, each linked to its page; the lot list has them all. */
export function HeldLots({ held }: { held: Overview['heldLots'] }) {
  return (
    <section aria-labelledby="held-lots" className="rounded-lg border border-zinc-200 bg-white px-5 py-4">
      <div className="mb-2 flex flex-wrap items-baseline justify-between gap-2">
        <h2 id="held-lots" className="text-lg font-semibold text-zinc-900">
          Lots on hold <span className="font-mono">{held.count}</span>
        </h2>
        {held.count > 0 && (
          <Link to="/results/lots?status=on-hold" className="text-sm text-accent-800 underline underline-offset-2">
            {held.count > held.items.length ? `All ${held.count} lots on hold` : 'Lot list, on hold only'}
          </Link>
        )}
      </div>
      {held.count === 0 ? (
        <p className="text-zinc-600">No lot is on hold.</p>
      ) : (
        <ul className="divide-y divide-zinc-100">
          {held.items.map((h) => (
            <li key={h.lotNumber} className="flex flex-wrap items-baseline gap-x-3 gap-y-0.5 py-1.5">
              <Link to={lotPath(h.lotNumber)} className="font-mono font-medium text-accent-800 underline underline-offset-2">
                {h.lotNumber}
              </Link>
              <span className="font-mono text-sm text-zinc-600">
                {h.productCode} · {h.lineCode}
              </span>
              <span className="text-sm text-zinc-600">
                since <PlantTime at={h.heldSince} className="font-mono" />
              </span>
              <span className="basis-full text-sm text-zinc-700 [overflow-wrap:anywhere]">
                {holdSourceWords[h.source]}: {h.reason}
              </span>
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
