import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { ApiError } from '@web/lib/http';
import { useLot, type Lot, type LotResult } from '@web/lib/lots';
import { useCharacteristics, usePlantClock, type Characteristic } from '@web/lib/catalogue';
import { FALLBACK_PLANT_CLOCK, formatPlantDateTime } from '@shared/time';
import { formatFigure, formatQuantity } from '@shared/figures';
import { specLimitsText, specVerdictBadge } from '@web/lib/spec';
import { setResult, setStatusText, type SetResult } from '../lib/sets';
import { useMay } from '@web/app/permissions';
import { CorrectMeasurementDialog, type CorrectedReading } from '../components/CorrectMeasurementDialog';
import { Alert } from '@web/components/ui/Alert';
import { Button } from '@web/components/ui/Button';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Badge } from '@web/components/ui/Badge';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';
import { LotStatusBadge } from '@web/components/LotStatusBadge';
import { LotDecisionDialog } from '../components/LotDecisionDialog';
import { HoldHistory, LotNcrs, OpenHoldNotice } from '../components/LotHolds';

interface CharacteristicResults {
  code: string;
  name: string;
  unit: string;
  readings: LotResult[];
  sources: string[];
  characteristic: Characteristic | undefined;
}

/** The lot's stored results, one line per characteristic in the order the API gives them, judged by the revision in force when the lot was made. */
function byCharacteristic(results: LotResult[], characteristics: Characteristic[], specs: Lot['specs']): CharacteristicResults[] {
  const groups = new Map<string, CharacteristicResults>();
  for (const r of results) {
    let group = groups.get(r.characteristicCode);
    if (!group) {
      const configured = characteristics.find((c) => c.code === r.characteristicCode);
      const characteristic = configured && { ...configured, spec: specs[r.characteristicCode] ?? null };
      group = { code: r.characteristicCode, name: r.characteristicName, unit: r.unit, readings: [], sources: [], characteristic };
      groups.set(r.characteristicCode, group);
    }
    group.readings.push(r);
    const source = r.source === 'manual' ? 'entered by hand' : `upload ${r.uploadId} (${r.uploadFile})`;
    if (!group.sources.includes(source)) group.sources.push(source);
  }
  return [...groups.values()];
}

export default function LotPage() {
  const { lotNumber = '' } = useParams();
  const lot = useLot(lotNumber);
  const characteristics = useCharacteristics();
  const clock = usePlantClock().data ?? FALLBACK_PLANT_CLOCK;
  // Whoever may enter results may correct them; auditors only read.
  const canCorrect = useMay('measurement.correct');
  const [correcting, setCorrecting] = useState<{ reading: LotResult; decimals: number } | null>(null);
  const [corrected, setCorrected] = useState<CorrectedReading | null>(null);
  // Lab staff put a lot on hold; a quality manager releases it.
  const canHold = useMay('lot.hold');
  const canRelease = useMay('lot.release');
  const canRaiseNcr = useMay('ncr.raise');
  const [deciding, setDeciding] = useState<'hold' | 'release' | null>(null);
  const [decided, setDecided] = useState<string | null>(null);

  if (lot.isPending) return <Loading label={`Loading lot ${lotNumber}…`} />;
  if (lot.isError) {
    if (lot.error instanceof ApiError && lot.error.status === 404) {
      return (
        <>
          <PageHeader title={`Lot ${lotNumber}`} />
          <EmptyState title={`No lot ${lotNumber} is recorded`}>Results create the lot when they are uploaded or entered.</EmptyState>
        </>
      );
    }
    return <ErrorState title={`Could not load lot ${lotNumber}`} error={lot.error} onRetry={() => lot.refetch()} />;
  }

  const { data } = lot;
  const groups = byCharacteristic(data.results, characteristics.data ?? [], data.specs);
  return (
    <>
      <PageHeader
        title={`Lot ${data.lotNumber}`}
        description={
          <>
            {data.productName} (<span className="font-mono">{data.productCode}</span>) on line <span className="font-mono">{data.lineCode}</span>, produced{' '}
            <span className="font-mono">{formatPlantDateTime(data.producedAt, clock)}</span>
            {data.shift ? `, ${data.shift} shift` : ''}.
          </>
        }
        actions={
          <>
            {data.status === 'released' && canHold && (
              <Button variant="secondary" onClick={() => setDeciding('hold')}>
                Put on hold…
              </Button>
            )}
            {data.status === 'on-hold' && canRelease && <Button onClick={() => setDeciding('release')}>Release lot…</Button>}
            {canRaiseNcr && (
              <Link
                to={`/ncrs/new?${new URLSearchParams({ lot: data.lotNumber })}`}
                className="inline-flex h-10 items-center rounded-md border border-zinc-300 bg-white px-4 font-medium text-zinc-900 hover:bg-zinc-50"
              >
                Raise NCR
              </Link>
            )}
          </>
        }
      />
      <p className="-mt-3 mb-4 flex items-center gap-2" data-testid="lot-status">
        <span className="text-sm font-medium text-zinc-700">Status</span> <LotStatusBadge status={data.status} />
      </p>
      {decided && (
        <Alert tone="success" className="mb-4">
          {decided}
        </Alert>
      )}
      <OpenHoldNotice lot={data} />
      {corrected && (
        <Alert tone="success" className="mb-4">
          Reading {corrected.reading.replicate} of <span className="font-mono">{corrected.reading.characteristicCode}</span> corrected from{' '}
          <span className="font-mono">{formatFigure(corrected.from, corrected.decimals)}</span> to <span className="font-mono">{formatFigure(corrected.to, corrected.decimals)}</span> {corrected.reading.unit}. The old value, your
          name and the reason are in the audit trail.
        </Alert>
      )}
      {groups.length === 0 ? (
        <EmptyState title="No results stored for this lot">Voided uploads leave no results behind.</EmptyState>
      ) : (
        <div className="overflow-x-auto rounded-lg border border-zinc-200 bg-white">
          <table className="w-full border-collapse text-left">
            <caption className="sr-only">Results of lot {data.lotNumber}</caption>
            <thead className="bg-zinc-100/80 text-sm text-zinc-700">
              <tr>
                <th scope="col" className="border-b border-zinc-200 px-3 py-2.5 font-semibold">Characteristic</th>
                <th scope="col" className="border-b border-zinc-200 px-3 py-2.5 font-semibold">Readings</th>
                <th scope="col" className="border-b border-zinc-200 px-3 py-2.5 text-right font-semibold">Result</th>
                <th scope="col" className="border-b border-zinc-200 px-3 py-2.5 font-semibold">Specification</th>
                <th scope="col" className="border-b border-zinc-200 px-3 py-2.5 font-semibold">Source</th>
              </tr>
            </thead>
            <tbody>
              {groups.map((g) => {
                const decimals = g.characteristic?.decimals ?? 2;
                const result = g.characteristic ? setResult(g.characteristic, g.readings.map((r) => r.value)) : null;
                const discarded = (i: number) => result?.discardedIndex === i;
                return (
                  <tr key={g.code} className="border-b border-zinc-100 align-top last:border-b-0">
                    <td className="px-3 py-2">
                      <span className="block font-mono text-sm">{g.code}</span>
                      <span className="block text-sm text-zinc-600">{g.name}</span>
                    </td>
                    <td className="px-3 py-2">
                      {canCorrect ? (
                        <ul className="flex flex-wrap gap-x-4 gap-y-1">
                          {g.readings.map((r, i) => (
                            <li key={r.id} className="inline-flex items-center gap-1.5">
                              <Reading value={formatFigure(r.value, decimals)} discarded={discarded(i)} />
                              <Button
                                variant="quiet"
                                size="sm"
                                className="h-7 px-2 text-accent-800 underline underline-offset-2"
                                aria-label={`Correct reading ${r.replicate} of ${g.code}…`}
                                onClick={() => setCorrecting({ reading: r, decimals })}
                              >
                                Correct…
                              </Button>
                            </li>
                          ))}
                        </ul>
                      ) : (
                        <span className="flex flex-wrap gap-x-3">
                          {g.readings.map((r, i) => (
                            <Reading key={r.id} value={formatFigure(r.value, decimals)} discarded={discarded(i)} />
                          ))}
                        </span>
                      )}
                      {result && <SetNote result={result} />}
                    </td>
                    <td className="px-3 py-2 text-right font-mono whitespace-nowrap">
                      {result?.value == null ? (result ? 'set rejected' : '—') : formatQuantity(result.value, decimals, g.unit)}
                    </td>
                    <td className="px-3 py-2">
                      {result?.value != null && <Verdict value={result.value} characteristic={g.characteristic!} />}
                      {hasLimits(g.characteristic?.spec) ? (
                        <span className="mt-1 block font-mono text-sm text-zinc-600">{specLimitsText(g.characteristic!.spec, g.unit, decimals)}</span>
                      ) : (
                        result?.value == null && <span className="text-sm text-zinc-600">No specification in force</span>
                      )}
                    </td>
                    <td className="px-3 py-2 text-sm text-zinc-700">{g.sources.join('; ')}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
      )}
      {correcting && (
        <CorrectMeasurementDialog
          reading={correcting.reading}
          decimals={correcting.decimals}
          onClose={() => setCorrecting(null)}
          onCorrected={(correction) => {
            setCorrecting(null);
            setCorrected(correction);
          }}
        />
      )}
      <HoldHistory lot={data} />
      <LotNcrs lot={data} />
      {deciding && (
        <LotDecisionDialog
          lot={data}
          action={deciding}
          onClose={() => setDeciding(null)}
          onDone={() => {
            setDecided(deciding === 'hold' ? `Lot ${data.lotNumber} is on hold. Subscribers of its line and product are told by e-mail.` : `Lot ${data.lotNumber} is released.`);
            setDeciding(null);
          }}
        />
      )}
      <p className="mt-4 text-sm">
        <Link to="/results/history" className="text-accent-800 underline underline-offset-2">
          Upload history
        </Link>
      </p>
    </>
  );
}

const hasLimits = (spec: Characteristic['spec'] | undefined) => !!spec && (spec.lsl !== null || spec.usl !== null);

/** A stored reading; the one EN 196-1 left out of the set's result is struck through and named. */
function Reading({ value, discarded }: { value: string; discarded: boolean }) {
  if (!discarded) return <span className="font-mono">{value}</span>;
  return (
    <span className="text-zinc-500">
      <span className="font-mono line-through">{value}</span> <span className="text-xs">(discarded)</span>
    </span>
  );
}

/** Why a prism set's result is what it is, where a value was discarded or the set rejected. */
function SetNote({ result }: { result: SetResult }) {
  if (result.status !== 'accepted-one-discarded' && result.status !== 'rejected') return null;
  const status = setStatusText[result.status];
  return (
    <div className="mt-1.5 space-y-1 text-sm">
      <Badge tone={status.tone}>{status.label}</Badge>
      <p className="text-zinc-600">{result.reason}</p>
    </div>
  );
}

function Verdict({ value, characteristic }: { value: number; characteristic: Characteristic }) {
  const verdict = specVerdictBadge(value, characteristic.spec, characteristic.unit, characteristic.decimals);
  return <Badge tone={verdict.tone}>{verdict.label}</Badge>;
}
