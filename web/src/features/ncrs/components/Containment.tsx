import { useState } from 'react';
import { Link } from 'react-router-dom';
import type { NcrView } from '@shared/schemas/ncrs';
import { formatFigure } from '@shared/figures';
import { useUpdateNcr } from '../api/ncrs';
import { Section, WriteError } from './Section';
import { lotPath } from '@web/lib/lots';
import { typedNumber } from '@web/lib/form-values';
import { LotStatusBadge } from '@web/components/LotStatusBadge';
import { PlantTime } from '@web/components/PlantTime';
import { PlainTable } from '@web/components/ui/Table';
import { Button } from '@web/components/ui/Button';
import { Input } from '@web/components/ui/Field';

const holdWords = { 'out-of-spec': 'Out of specification', manual: 'Held by hand', ncr: 'NCR containment' } as const;

/** The lots concerned, their standing now and the hold that contains them. */
export function Containment({ ncr, mayManage }: { ncr: NcrView; mayManage: boolean }) {
  return (
    <Section id="containment" title="Containment: lots concerned">
      {ncr.lots.length === 0 ? (
        <p className="text-zinc-600">No lot is listed on this NCR.</p>
      ) : (
        <PlainTable caption="Lots concerned" headings={['Lot', 'Product', 'Produced', 'Quantity', 'Standing', 'Hold']}>
          {ncr.lots.map((l) => (
            <tr key={l.lotId} className="border-b border-zinc-100 align-top last:border-b-0" data-lot={l.lotNumber}>
              <td className="px-3 py-2 font-mono whitespace-nowrap">
                <Link className="text-accent-800 underline" to={lotPath(l.lotNumber)}>
                  {l.lotNumber}
                </Link>
              </td>
              <td className="px-3 py-2 font-mono">{l.productCode}</td>
              <td className="figures px-3 py-2 whitespace-nowrap">
                <PlantTime at={l.producedAt} />
              </td>
              <td className="figures px-3 py-2 text-right whitespace-nowrap">{l.quantityT === null ? '—' : `${formatFigure(l.quantityT, 1)} t`}</td>
              <td className="px-3 py-2">
                <LotStatusBadge status={l.lotStatus} />
              </td>
              <td className="px-3 py-2 text-sm">
                {l.hold ? (
                  <>
                    {/* This NCR's own containment needs no reason beside it: the NCR is the reason. */}
                    {l.hold.ncr?.id === ncr.id ? (
                      <span className="font-medium">Contained by this NCR</span>
                    ) : (
                      <>
                        <span className="font-medium">{holdWords[l.hold.source]}</span>
                        {l.hold.ncr && <> ({l.hold.ncr.number})</>}: {l.hold.reason}
                      </>
                    )}
                    <span className="block text-zinc-600">
                      since <PlantTime at={l.hold.placedAt} />
                      {l.hold.placedBy ? `, ${l.hold.placedBy}` : ''}
                    </span>
                  </>
                ) : (
                  <span className="text-zinc-600">Not on hold</span>
                )}
              </td>
            </tr>
          ))}
        </PlainTable>
      )}
      {mayManage && ncr.status !== 'closed' && <AddLot ncr={ncr} />}
    </Section>
  );
}

function AddLot({ ncr }: { ncr: NcrView }) {
  const update = useUpdateNcr(ncr.id);
  const [lotNumber, setLotNumber] = useState('');
  const [quantity, setQuantity] = useState('');
  const [hold, setHold] = useState(true);
  return (
    <form
      className="mt-4 flex flex-wrap items-end gap-3 print:hidden"
      aria-label="Add a lot"
      onSubmit={(e) => {
        e.preventDefault();
        const quantityT = typedNumber(quantity);
        update.mutate(
          { addLots: [{ lotNumber: lotNumber.trim(), quantityT }], holdLots: hold },
          {
            onSuccess: () => {
              setLotNumber('');
              setQuantity('');
            },
          },
        );
      }}
    >
      <div className="space-y-1">
        <label htmlFor="ncr-add-lot" className="block text-sm font-medium text-zinc-800">
          Another lot
        </label>
        <Input id="ncr-add-lot" className="w-48 font-mono" required maxLength={64} value={lotNumber} onChange={(e) => setLotNumber(e.target.value)} />
      </div>
      <div className="space-y-1">
        <label htmlFor="ncr-add-lot-t" className="block text-sm font-medium text-zinc-800">
          Quantity (t)
        </label>
        <Input id="ncr-add-lot-t" className="w-28 font-mono" inputMode="decimal" value={quantity} onChange={(e) => setQuantity(e.target.value)} />
      </div>
      <label className="flex h-10 items-center gap-2 text-sm">
        <input type="checkbox" className="size-4" checked={hold} onChange={(e) => setHold(e.target.checked)} />
        Put it on hold now
      </label>
      <Button type="submit" variant="secondary" busy={update.isPending}>
        Add the lot
      </Button>
      {update.isError && (
        <div className="basis-full">
          <WriteError error={update.error} />
        </div>
      )}
    </form>
  );
}
