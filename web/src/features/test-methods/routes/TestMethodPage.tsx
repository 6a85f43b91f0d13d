import { Link, useParams } from 'react-router-dom';
import { useTestMethods } from '@web/lib/test-methods';
import { useCharacteristics } from '@web/lib/catalogue';
import { specLimitsText } from '@web/lib/spec';
import { physicalRangeText, rawLoadExplanation, stateLabels } from '../lib/formulas';
import { MethodCautions } from '@web/components/MethodCautions';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Card } from '@web/components/ui/Card';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

export default function TestMethodPage() {
  const { code } = useParams();
  const methods = useTestMethods();
  const characteristics = useCharacteristics();

  if (methods.isPending) return <Loading label="Loading the test method…" />;
  if (methods.isError) return <ErrorState title="Could not load the test method" error={methods.error} onRetry={() => methods.refetch()} />;
  const method = methods.data.find((m) => m.code === code);
  if (!method) {
    return (
      <>
        <PageHeader title="Test method not found" />
        <EmptyState title={`There is no test method with the code ${code}`}>
          <Link to="/test-methods" className="text-accent-800 underline">
            See all test methods
          </Link>
        </EmptyState>
      </>
    );
  }
  const explanation = rawLoadExplanation(method);
  const testedBy = (characteristics.data ?? []).filter((c) => c.testMethodCode === method.code && c.active);

  return (
    <>
      <p className="mb-2 text-sm">
        <Link to="/test-methods" className="text-accent-800 underline-offset-2 hover:underline">
          ← All test methods
        </Link>
      </p>
      <PageHeader title={method.name} description={method.standard} />
      <div className="grid gap-5 xl:grid-cols-[minmax(0,1fr)_24rem]">
        <div className="space-y-5">
          <Card title="The method">
            <dl className="grid gap-x-6 gap-y-3 sm:grid-cols-[12rem_minmax(0,1fr)]">
              <dt className="font-medium text-zinc-700">Code</dt>
              <dd className="font-mono">{method.code}</dd>
              <dt className="font-medium text-zinc-700">Standard</dt>
              <dd>{method.standard}</dd>
              <dt className="font-medium text-zinc-700">Specimens</dt>
              <dd>{stateLabels[method.state]}</dd>
              <dt className="font-medium text-zinc-700">Unit</dt>
              <dd className="font-mono">{method.unit}</dd>
              <dt className="font-medium text-zinc-700">Possible range</dt>
              <dd>
                <span className="font-mono">{physicalRangeText(method)}</span>
                <span className="block text-sm text-zinc-600">A value outside this range cannot be a measurement and is refused at entry.</span>
              </dd>
              <dt className="font-medium text-zinc-700">Decimals shown</dt>
              <dd className="font-mono">{method.decimals}</dd>
            </dl>
          </Card>

          <Card title="From machine reading to result">
            {explanation ? (
              <div className="space-y-2">
                <p>{explanation.reading}</p>
                <p className="font-mono text-[0.95rem]">{explanation.formula}</p>
                <p>{explanation.example}</p>
                {explanation.set && <p className="text-zinc-700">{explanation.set}</p>}
              </div>
            ) : (
              <p>Entered as the result in {method.unit}; there is no machine reading to convert.</p>
            )}
          </Card>

          <Card title="Characteristics tested this way">
            {characteristics.isPending ? (
              <Loading label="Loading characteristics…" className="py-2" />
            ) : characteristics.isError ? (
              <ErrorState title="Could not load the characteristics" error={characteristics.error} onRetry={() => characteristics.refetch()} />
            ) : testedBy.length === 0 ? (
              <p className="text-zinc-600">No product is tested by this method at present.</p>
            ) : (
              <ul className="divide-y divide-zinc-100">
                {testedBy.map((c) => (
                  <li key={c.code} className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1 py-2">
                    <span>
                      <span className="font-mono text-sm">{c.code}</span> · {c.name}
                    </span>
                    <span className="font-mono text-sm text-zinc-700">
                      {c.subgroupSize} per lot · {specLimitsText(c.spec, c.unit, c.decimals)}
                    </span>
                  </li>
                ))}
              </ul>
            )}
          </Card>
        </div>
        <MethodCautions cautions={method.cautions} className="self-start" />
      </div>
    </>
  );
}
