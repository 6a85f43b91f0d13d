import { Link } from 'react-router-dom';
import { useCharacteristics, type Characteristic } from '@web/lib/catalogue';
import { characteristicLabel } from '@web/lib/names';
import { figure } from '@web/lib/chart-format';
import { useMay } from '@web/app/permissions';
import { PlantTime } from '@web/components/PlantTime';
import { RevisionNote } from '../components/RevisionNote';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

interface ProductGroup {
  code: string;
  name: string;
  lineCode: string | null;
  characteristics: Characteristic[];
}

function byProduct(characteristics: Characteristic[]): ProductGroup[] {
  const groups = new Map<string, ProductGroup>();
  for (const c of characteristics) {
    let group = groups.get(c.productCode);
    if (!group) {
      group = { code: c.productCode, name: c.productName, lineCode: c.lineCode, characteristics: [] };
      groups.set(c.productCode, group);
    }
    group.characteristics.push(c);
  }
  return [...groups.values()];
}

const th = 'border-b border-zinc-200 px-3 py-2.5 font-semibold whitespace-nowrap';

/** /records/specifications: the limits in force for every characteristic, by product. */
export default function SpecificationsPage() {
  const characteristics = useCharacteristics();
  const canRevise = useMay('specification.revise');

  return (
    <>
      <PageHeader
        title="Specifications"
        description={
          canRevise
            ? 'The limits each characteristic is judged against. Open a characteristic to see its revisions or add one.'
            : 'The limits each characteristic is judged against. Open a characteristic to see its revisions.'
        }
      />
      <div className="mb-6">
        <RevisionNote />
      </div>
      {characteristics.isPending ? (
        <Loading label="Loading the specifications…" />
      ) : characteristics.isError ? (
        <ErrorState title="Could not load the specifications" error={characteristics.error} onRetry={() => characteristics.refetch()} />
      ) : characteristics.data.length === 0 ? (
        <EmptyState title="No characteristics are set up yet">An administrator adds products and their characteristics first.</EmptyState>
      ) : (
        <div className="space-y-8">
          {byProduct(characteristics.data).map((product) => (
            <section key={product.code} aria-labelledby={`product-${product.code}`}>
              <h2 id={`product-${product.code}`} className="mb-2 text-lg font-semibold text-zinc-900">
                {product.name} <span className="font-mono text-base font-normal text-zinc-600">{product.code}</span>
                {product.lineCode && <span className="text-base font-normal text-zinc-600"> · line <span className="font-mono">{product.lineCode}</span></span>}
              </h2>
              <div className="overflow-x-auto rounded-lg border border-zinc-200 bg-white">
                {/* Fixed columns, so the figures of every product's table line up down the page. */}
                <table className="w-full min-w-[44rem] table-fixed border-collapse text-left">
                  <caption className="sr-only">Specifications of {product.name}</caption>
                  <colgroup>
                    <col className="w-[30%]" />
                    <col className="w-[9%]" />
                    <col className="w-[9%]" />
                    <col className="w-[9%]" />
                    <col className="w-[8%]" />
                    <col className="w-[9%]" />
                    <col className="w-[26%]" />
                  </colgroup>
                  <thead className="bg-zinc-100/80 text-sm text-zinc-700">
                    <tr>
                      <th scope="col" className={th}>Characteristic</th>
                      <th scope="col" className={`${th} text-right`}>LSL</th>
                      <th scope="col" className={`${th} text-right`}>Target</th>
                      <th scope="col" className={`${th} text-right`}>USL</th>
                      <th scope="col" className={th}>Unit</th>
                      <th scope="col" className={`${th} text-right`}>Revision</th>
                      <th scope="col" className={th}>In force since</th>
                    </tr>
                  </thead>
                  <tbody>
                    {product.characteristics.map((c) => (
                      <tr key={c.id} className="border-b border-zinc-100 last:border-b-0 hover:bg-zinc-50">
                        <th scope="row" className="px-3 py-2 text-left font-normal">
                          <Link to={`/records/specifications/${c.id}`} className="font-mono text-sm text-accent-800 underline underline-offset-2">
                            {c.code}
                          </Link>
                          <span className="block text-sm text-zinc-600">{characteristicLabel(c)}</span>
                        </th>
                        {c.spec ? (
                          <>
                            <td className="px-3 py-2 text-right font-mono">{figure(c.spec.lsl, c.decimals)}</td>
                            <td className="px-3 py-2 text-right font-mono">{figure(c.spec.target, c.decimals)}</td>
                            <td className="px-3 py-2 text-right font-mono">{figure(c.spec.usl, c.decimals)}</td>
                            <td className="px-3 py-2">{c.unit}</td>
                            <td className="px-3 py-2 text-right font-mono">{c.spec.revision}</td>
                            <td className="px-3 py-2 font-mono text-sm whitespace-nowrap"><PlantTime at={c.spec.effectiveFrom} /></td>
                          </>
                        ) : (
                          <td colSpan={6} className="px-3 py-2 text-zinc-600">
                            No specification in force
                          </td>
                        )}
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
            </section>
          ))}
        </div>
      )}
    </>
  );
}
