import { useState } from 'react';
import { Link, useParams } from 'react-router-dom';
import { useCharacteristics, usePlantClock } from '@web/lib/catalogue';
import { characteristicLabel } from '@web/lib/names';
import { specLimitsText } from '@web/lib/spec';
import { useMay } from '@web/app/permissions';
import { useSpecRevisions, type SpecRevision } from '@web/lib/specifications';
import { PlantTime } from '@web/components/PlantTime';
import { RevisionNote } from '../components/RevisionNote';
import { RevisionHistory } from '../components/RevisionHistory';
import { SpecRevisionForm } from '../components/SpecRevisionForm';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Card } from '@web/components/ui/Card';
import { Alert } from '@web/components/ui/Alert';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

/** /records/specifications/:characteristicId: the revision in force, the history, and a new revision. */
export default function SpecificationPage() {
  const id = Number(useParams().characteristicId);
  const characteristics = useCharacteristics();
  const revisions = useSpecRevisions(id);
  const clock = usePlantClock();
  const canRevise = useMay('specification.revise');
  // Whether the saved revision is still to come is judged when it is saved, not at every render.
  const [saved, setSaved] = useState<(SpecRevision & { future: boolean }) | null>(null);

  const back = (
    <p className="mb-4 text-sm">
      <Link to="/records/specifications" className="text-accent-800 underline underline-offset-2">
        All specifications
      </Link>
    </p>
  );

  if (characteristics.isPending || clock.isPending) return <Loading label="Loading the characteristic…" />;
  if (characteristics.isError) return <ErrorState title="Could not load the characteristic" error={characteristics.error} onRetry={() => characteristics.refetch()} />;
  if (clock.isError) return <ErrorState title="Could not load the plant's clock" error={clock.error} onRetry={() => clock.refetch()} />;
  const characteristic = characteristics.data.find((c) => c.id === id);
  if (!characteristic) {
    return (
      <>
        {back}
        <EmptyState title="No such characteristic">It may have been removed; choose one from the list of specifications.</EmptyState>
      </>
    );
  }

  const { unit, decimals } = characteristic;
  return (
    <>
      {back}
      <PageHeader
        title={`${characteristic.code} · ${characteristicLabel(characteristic)}`}
        description={
          <>
            {characteristic.productName} (<span className="font-mono">{characteristic.productCode}</span>), {characteristic.testMethodName}, {characteristic.standard}
          </>
        }
      />
      <div className="space-y-6">
        <RevisionNote />
        <section aria-labelledby="in-force" className="rounded-lg border border-zinc-200 bg-white px-5 py-4">
          <h2 id="in-force" className="text-lg font-semibold text-zinc-900">
            In force now
          </h2>
          {characteristic.spec ? (
            <p className="mt-1 text-zinc-800" data-testid="spec-in-force">
              Revision <span className="font-mono">{characteristic.spec.revision}</span>: <span className="font-mono">{specLimitsText(characteristic.spec, unit, decimals)}</span>, since{' '}
              <span className="font-mono"><PlantTime at={characteristic.spec.effectiveFrom} /></span>
            </p>
          ) : (
            <p className="mt-1 text-zinc-700" data-testid="spec-in-force">
              No specification in force: results of this characteristic are not judged against limits.
            </p>
          )}
        </section>

        {saved && (
          <Alert tone="success">
            Revision <span className="font-mono">{saved.revision}</span> saved
            {saved.future ? (
              <>
                ; it takes effect on <span className="font-mono"><PlantTime at={saved.effectiveFrom} /></span>.
              </>
            ) : (
              <>
                , in force from <span className="font-mono"><PlantTime at={saved.effectiveFrom} /></span>.
              </>
            )}{' '}
            The change and its reason are in the audit trail.
          </Alert>
        )}

        {revisions.isPending ? (
          <Loading label="Loading the revisions…" />
        ) : revisions.isError ? (
          <ErrorState title="Could not load the revisions" error={revisions.error} onRetry={() => revisions.refetch()} />
        ) : (
          <>
            {canRevise && (
              <Card title="Add a revision">
                <SpecRevisionForm
                  key={revisions.data[0]?.id ?? 'first'}
                  characteristic={characteristic}
                  latest={revisions.data[0]}
                  clock={clock.data}
                  onSaved={(revision) => setSaved({ ...revision, future: Date.parse(revision.effectiveFrom) > Date.now() })}
                />
              </Card>
            )}
            <section aria-labelledby="history">
              <h2 id="history" className="mb-2 text-lg font-semibold text-zinc-900">
                Revision history
              </h2>
              {revisions.data.length === 0 ? (
                <EmptyState title="No revision yet">{canRevise ? 'Add the first one above.' : 'A quality manager adds the first one.'}</EmptyState>
              ) : (
                <RevisionHistory revisions={revisions.data} inForce={characteristic.spec?.revision ?? null} unit={unit} decimals={decimals} />
              )}
            </section>
          </>
        )}
      </div>
    </>
  );
}
