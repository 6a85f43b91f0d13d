import { Link } from 'react-router-dom';
import { formatFigure } from '@shared/figures';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import { lotPath, useLot, type LotResult } from '@web/lib/lots';
import { useCharacteristics } from '@web/lib/catalogue';
import { Dialog } from '@web/components/ui/Dialog';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { Button } from '@web/components/ui/Button';
import { shiftName } from '@web/lib/chart-format';

interface Group {
  code: string;
  name: string;
  unit: string;
  values: number[];
  testedAt: string | null;
  operator: string | null;
  notes: string[];
}

function byCharacteristic(results: LotResult[]): Group[] {
  const groups = new Map<string, Group>();
  for (const r of results) {
    let g = groups.get(r.characteristicCode);
    if (!g) {
      g = { code: r.characteristicCode, name: r.characteristicName, unit: r.unit, values: [], testedAt: r.testedAt, operator: r.operator, notes: [] };
      groups.set(r.characteristicCode, g);
    }
    g.values.push(r.value);
    if (r.note) g.notes.push(r.note);
  }
  return [...groups.values()];
}

/** One lot with all its results across characteristics, each linked to its own chart. */
export function LotDetailsDialog({ lotNumber, currentCode, clock, onClose }: { lotNumber: string; currentCode: string; clock: PlantClock; onClose: () => void }) {
  const lot = useLot(lotNumber);
  const characteristics = useCharacteristics();
  const idByCode = new Map((characteristics.data ?? []).map((c) => [c.code, c]));

  return (
    <Dialog title={`Lot ${lotNumber}`} onClose={onClose}>
      <div className="max-h-[70vh] space-y-3 overflow-y-auto pr-1">
        {lot.isPending ? (
          <Loading label={`Loading lot ${lotNumber}…`} />
        ) : lot.isError ? (
          <ErrorState title={`Could not load lot ${lotNumber}`} error={lot.error} onRetry={() => lot.refetch()} />
        ) : (
          <>
            <p className="text-sm text-zinc-700">
              {lot.data.productName} (<span className="font-mono">{lot.data.productCode}</span>) on line <span className="font-mono">{lot.data.lineCode}</span>, produced{' '}
              <span className="font-mono">{formatPlantDateTime(lot.data.producedAt, clock)}</span>, {shiftName(lot.data.shift).toLowerCase()}.
            </p>
            <ul className="divide-y divide-zinc-100 rounded-md border border-zinc-200" aria-label={`Results of lot ${lotNumber}`}>
              {byCharacteristic(lot.data.results).map((g) => {
                const c = idByCode.get(g.code);
                const decimals = c?.decimals ?? 2;
                return (
                  <li key={g.code} className={g.code === currentCode ? 'bg-accent-50 px-3 py-2' : 'px-3 py-2'}>
                    <div className="flex flex-wrap items-baseline justify-between gap-x-3">
                      {c && g.code !== currentCode ? (
                        <Link to={`/charts/${c.id}?lot=${encodeURIComponent(lotNumber)}`} onClick={onClose} className="font-medium text-accent-700 underline underline-offset-2">
                          {g.name}
                        </Link>
                      ) : (
                        <span className="font-medium">
                          {g.name}
                          {g.code === currentCode && <span className="ml-2 text-sm font-normal text-zinc-600">(this chart)</span>}
                        </span>
                      )}
                      <span className="font-mono text-sm">
                        {g.values.map((v) => formatFigure(v, decimals)).join(' · ')} {g.unit}
                      </span>
                    </div>
                    <p className="text-sm text-zinc-500">
                      {g.testedAt ? `Tested ${formatPlantDateTime(g.testedAt, clock)}` : 'Test time not recorded'}
                      {g.operator ? ` by ${g.operator}` : ''}
                      {g.notes.length ? ` · ${g.notes.join('; ')}` : ''}
                    </p>
                  </li>
                );
              })}
            </ul>
          </>
        )}
      </div>
      <div className="mt-4 flex flex-wrap items-center gap-3">
        <Button variant="secondary" onClick={onClose}>
          Close
        </Button>
        <Link to={lotPath(lotNumber)} className="font-medium text-accent-700 underline underline-offset-2">
          Open the lot page
        </Link>
      </div>
    </Dialog>
  );
}
