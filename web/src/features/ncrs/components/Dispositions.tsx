import { useState } from 'react';
import { lotDispositions, lotDispositionWords, type LotDisposition, type NcrLotView, type NcrView } from '@shared/schemas/ncrs';
import { useUpdateNcr } from '../api/ncrs';
import { Section, WriteError } from './Section';
import { useProducts } from '@web/lib/catalogue';
import { LotStatusBadge } from '@web/components/LotStatusBadge';
import { PlantTime } from '@web/components/PlantTime';
import { Button } from '@web/components/ui/Button';
import { Select } from '@web/components/ui/Field';
import { TextArea } from '@web/components/ui/TextArea';

const consequence: Record<LotDisposition, string> = {
  release: 'The lot is released for dispatch as it is.',
  rework: 'The lot stays on hold until it has been reworked and tested again.',
  downgrade: 'The lot is released to be sold as the product chosen below.',
  scrap: 'The lot is rejected: it is not dispatched.',
};

/** The decision on each lot, with the note that explains it. */
export function Dispositions({ ncr, mayManage }: { ncr: NcrView; mayManage: boolean }) {
  if (ncr.lots.length === 0) return null;
  return (
    <Section id="dispositions" title="Disposition of the lots">
      <ul className="space-y-3">
        {ncr.lots.map((l) => (
          <LotDecision key={l.lotId} ncr={ncr} lot={l} mayDecide={mayManage && ncr.status !== 'closed'} />
        ))}
      </ul>
    </Section>
  );
}

function LotDecision({ ncr, lot, mayDecide }: { ncr: NcrView; lot: NcrLotView; mayDecide: boolean }) {
  const [deciding, setDeciding] = useState(false);
  return (
    <li className="ncr-keep rounded-md border border-zinc-200 px-4 py-3" data-disposition={lot.lotNumber}>
      <div className="flex flex-wrap items-center gap-2">
        <span className="font-mono font-medium">{lot.lotNumber}</span>
        <LotStatusBadge status={lot.lotStatus} />
        {lot.disposition ? (
          <span className="font-medium">
            {lotDispositionWords[lot.disposition]}
            {lot.downgradeProduct && ` to ${lot.downgradeProduct.code} · ${lot.downgradeProduct.name}`}
          </span>
        ) : (
          <span className="text-zinc-600">No decision yet</span>
        )}
      </div>
      {lot.disposition && (
        <>
          {lot.dispositionNote && <p className="mt-1 whitespace-pre-line">{lot.dispositionNote}</p>}
          <p className="figures text-sm text-zinc-600">
            {lot.disposedBy ?? 'Decided'}
            {lot.disposedAt && (
              <>
                , <PlantTime at={lot.disposedAt} />
              </>
            )}
          </p>
        </>
      )}
      {/* A decision stands once recorded (the API refuses a change with 409), so only an open lot offers one. */}
      {mayDecide && !deciding && !lot.disposition && (
        <Button size="sm" variant="secondary" className="mt-2 print:hidden" onClick={() => setDeciding(true)}>
          Decide
        </Button>
      )}
      {deciding && <DecisionForm ncr={ncr} lot={lot} onDone={() => setDeciding(false)} />}
    </li>
  );
}

function DecisionForm({ ncr, lot, onDone }: { ncr: NcrView; lot: NcrLotView; onDone: () => void }) {
  const update = useUpdateNcr(ncr.id);
  const products = useProducts();
  const [disposition, setDisposition] = useState<LotDisposition | ''>(lot.disposition ?? '');
  const [productId, setProductId] = useState(lot.downgradeProduct ? String(lot.downgradeProduct.id) : '');
  const [note, setNote] = useState(lot.dispositionNote ?? '');
  const key = lot.lotNumber.replace(/[^A-Za-z0-9-]/g, '_');
  return (
    <form
      className="mt-3 space-y-3 border-t border-zinc-100 pt-3"
      aria-label={`Disposition of lot ${lot.lotNumber}`}
      onSubmit={(e) => {
        e.preventDefault();
        if (!disposition) return;
        update.mutate(
          {
            dispositions: [
              { lotNumber: lot.lotNumber, disposition, downgradeProductId: disposition === 'downgrade' && productId ? Number(productId) : undefined, note },
            ],
          },
          { onSuccess: onDone },
        );
      }}
    >
      <div className="flex flex-wrap gap-3">
        <div className="space-y-1">
          <label htmlFor={`disp-${key}`} className="block text-sm font-medium text-zinc-800">
            Decision
          </label>
          <Select id={`disp-${key}`} className="w-72" required value={disposition} onChange={(e) => setDisposition(e.target.value as LotDisposition | '')}>
            <option value="">Choose…</option>
            {lotDispositions.map((d) => (
              <option key={d} value={d}>
                {lotDispositionWords[d]}
              </option>
            ))}
          </Select>
        </div>
        {disposition === 'downgrade' && (
          <div className="space-y-1">
            <label htmlFor={`disp-product-${key}`} className="block text-sm font-medium text-zinc-800">
              Sold as
            </label>
            <Select id={`disp-product-${key}`} className="w-72" required value={productId} onChange={(e) => setProductId(e.target.value)}>
              <option value="">Choose the product…</option>
              {(products.data ?? [])
                .filter((p) => p.code !== lot.productCode)
                .map((p) => (
                  <option key={p.id} value={p.id}>
                    {p.code} · {p.name}
                  </option>
                ))}
            </Select>
          </div>
        )}
      </div>
      {disposition && <p className="text-sm text-zinc-700">{consequence[disposition]}</p>}
      {disposition === 'downgrade' && (
        <p className="text-sm text-zinc-700">Check that the lot meets the specification of the product it is sold as, and relabel the bags before dispatch.</p>
      )}
      <div className="space-y-1">
        <label htmlFor={`disp-note-${key}`} className="block text-sm font-medium text-zinc-800">
          Note
        </label>
        <TextArea id={`disp-note-${key}`} rows={3} required minLength={5} maxLength={2000} value={note} onChange={(e) => setNote(e.target.value)} />
        <p className="text-sm text-zinc-600">Why this decision: the results, the customer’s agreement, the rework done.</p>
      </div>
      {update.isError && <WriteError error={update.error} />}
      <div className="flex gap-2">
        <Button type="submit" size="sm" busy={update.isPending}>
          Record the decision
        </Button>
        <Button size="sm" variant="secondary" onClick={onDone}>
          Cancel
        </Button>
      </div>
    </form>
  );
}
