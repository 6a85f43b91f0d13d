import { Link } from 'react-router-dom';
import { holdSourceWords } from '@shared/schemas/lots';
import { lotDispositionWords, ncrStatusWords } from '@shared/schemas/ncrs';
import type { Lot } from '@web/lib/lots';
import { PlantTime } from '@web/components/PlantTime';
import { PlainTable } from '@web/components/ui/Table';
import { Alert } from '@web/components/ui/Alert';

/** What holds the lot now: the open hold's reason and since when, and whether the result behind it was corrected. */
export function OpenHoldNotice({ lot }: { lot: Lot }) {
  const open = lot.holds.find((h) => h.releasedAt === null);
  if (lot.status === 'rejected') {
    return (
      <Alert tone="error" className="mb-4">
        Lot rejected: an NCR decided to scrap it. It may not be dispatched.
      </Alert>
    );
  }
  if (!open) return null;
  return (
    <div role="status" className="mb-4 rounded-md border border-amber-300 bg-amber-50 px-4 py-3 text-amber-950">
      <p>
        <strong>On hold</strong> since <PlantTime at={open.placedAt} className="font-mono" />
        {open.placedBy ? ` by ${open.placedBy}` : ' by Prismline'}: {open.reason}
      </p>
      {open.causeWithdrawn && (
        <p className="mt-1">
          The data no longer show the result that caused this hold outside the specification: it was corrected or voided since. The hold stays until a
          quality manager has checked why the first result was wrong and releases the lot.
        </p>
      )}
      <p className="mt-1">Do not dispatch the lot until it is released.</p>
    </div>
  );
}

/** Every hold of the lot, newest first: who placed it and why, who released it and why. */
export function HoldHistory({ lot }: { lot: Lot }) {
  return (
    <section aria-labelledby="lot-holds" className="mt-8">
      <h2 id="lot-holds" className="mb-2 text-lg font-semibold text-zinc-900">
        Hold history
      </h2>
      {lot.holds.length === 0 ? (
        <p className="text-zinc-600">This lot has never been on hold.</p>
      ) : (
        <PlainTable caption={`Holds of lot ${lot.lotNumber}, newest first`} headings={['Put on hold', 'Why', 'Released']}>
          {lot.holds.map((h) => (
            <tr key={h.id} className="border-b border-zinc-100 align-top last:border-b-0">
              <td className="px-3 py-2 text-sm whitespace-nowrap">
                <PlantTime at={h.placedAt} className="block font-mono" />
                <span className="block text-zinc-600">{h.placedBy ?? 'Prismline'}</span>
              </td>
              <td className="px-3 py-2">
                <span className="block text-sm font-medium text-zinc-700">
                  {holdSourceWords[h.source]}
                  {h.ncr && (
                    <>
                      {' '}
                      <Link to={`/ncrs/${h.ncr.id}`} className="font-mono text-accent-800 underline underline-offset-2">
                        {h.ncr.number}
                      </Link>
                    </>
                  )}
                </span>
                <span className="block [overflow-wrap:anywhere]">{h.reason}</span>
                {h.causeWithdrawn && <span className="mt-1 block text-sm text-zinc-600">The result behind this hold was corrected or voided since; it no longer shows the lot outside the specification.</span>}
              </td>
              <td className="px-3 py-2">
                {h.releasedAt ? (
                  <>
                    <PlantTime at={h.releasedAt} className="block font-mono text-sm" />
                    <span className="block text-sm text-zinc-600">{h.releasedBy}</span>
                    <span className="block [overflow-wrap:anywhere]">{h.releaseReason}</span>
                  </>
                ) : (
                  <span className="font-medium">Still on hold</span>
                )}
              </td>
            </tr>
          ))}
        </PlainTable>
      )}
    </section>
  );
}

/** The NCRs that concern the lot, with the decision on this lot. */
export function LotNcrs({ lot }: { lot: Lot }) {
  return (
    <section aria-labelledby="lot-ncrs" className="mt-8">
      <h2 id="lot-ncrs" className="mb-2 text-lg font-semibold text-zinc-900">
        Nonconformance reports
      </h2>
      {lot.ncrs.length === 0 ? (
        <p className="text-zinc-600">No NCR concerns this lot.</p>
      ) : (
        <PlainTable caption={`NCRs concerning lot ${lot.lotNumber}`} headings={['NCR', 'Title', 'State', 'Decision on this lot']}>
          {lot.ncrs.map((n) => (
            <tr key={n.id} className="border-b border-zinc-100 align-top last:border-b-0">
              <td className="px-3 py-2">
                <Link to={`/ncrs/${n.id}`} className="font-mono text-accent-800 underline underline-offset-2">
                  {n.number}
                </Link>
              </td>
              <td className="px-3 py-2">{n.title}</td>
              <td className="px-3 py-2">{ncrStatusWords[n.status]}</td>
              <td className="px-3 py-2">{n.disposition ? lotDispositionWords[n.disposition] : 'Not decided yet'}</td>
            </tr>
          ))}
        </PlainTable>
      )}
    </section>
  );
}
