import { useCallback, useState } from 'react';
import { useTestMethods } from '@web/lib/test-methods';
import { usePlantClock } from '@web/lib/catalogue';
import type { Notice } from '@web/components/ui/Notice';
import type { CharacteristicView } from '@shared/schemas/catalogue';
import { useCatalogueCharacteristics, useCatalogueProducts } from '../api/catalogue';
import { CharacteristicForm } from '../components/CharacteristicForm';
import { CharacteristicsTable } from '../components/CharacteristicsTable';
import { EditorCard } from '../components/EditorCard';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

/** /admin/catalogue/characteristics: what the lab tests on each product, and how it is charted. */
export default function CharacteristicsPage() {
  const characteristics = useCatalogueCharacteristics();
  const products = useCatalogueProducts();
  const methods = useTestMethods();
  const clock = usePlantClock();
  const [editing, setEditing] = useState<'new' | CharacteristicView | null>(null);
  const [notice, setNotice] = useState<Notice | null>(null);
  const edit = useCallback((c: CharacteristicView) => {
    setNotice(null);
    setEditing(c);
  }, []);

  const failed = [characteristics, products, methods, clock].find((q) => q.isError);
  const header = (
    <PageHeader
      title="Characteristics"
      description="What the lab tests on each product — a test method at an age — and how the SPC run charts it. Characteristics are never deleted: deactivate one that is no longer tested."
      actions={
        <Button onClick={() => setEditing('new')} disabled={editing === 'new' || !products.data?.length}>
          Add a characteristic
        </Button>
      }
    />
  );
  if (failed) return <>{header}<ErrorState title="Could not load the characteristics" error={failed.error} onRetry={() => [characteristics, products, methods, clock].forEach((q) => q.refetch())} /></>;
  if (!characteristics.data || !products.data || !methods.data || !clock.data) return <>{header}<Loading label="Loading the characteristics…" /></>;

  const saved = (c: CharacteristicView, verb: string) => {
    setEditing(null);
    setNotice({ tone: 'success', text: `${c.code} ${verb}.${c.spec && verb === 'added' ? ` Specification revision ${c.spec.revision} is in force.` : ''}` });
  };
  return (
    <>
      {header}
      <div className="space-y-4">
        {editing && (
          <EditorCard key={editing === 'new' ? 'new' : editing.id} title={editing === 'new' ? 'Add a characteristic' : `Change ${editing.code}`}>
            <CharacteristicForm
              characteristic={editing === 'new' ? undefined : editing}
              products={products.data}
              methods={methods.data}
              clock={clock.data}
              onSaved={(c) => saved(c, editing === 'new' ? 'added' : 'saved')}
              onCancel={() => setEditing(null)}
            />
          </EditorCard>
        )}
        {notice && <Alert tone={notice.tone}>{notice.text}</Alert>}
        {products.data.length === 0 ? (
          <EmptyState title="No product yet">Add a product first, under Products; its characteristics follow.</EmptyState>
        ) : characteristics.data.length === 0 ? (
          <EmptyState title="No characteristic yet">Add the first one with “Add a characteristic”.</EmptyState>
        ) : (
          <CharacteristicsTable characteristics={characteristics.data} onEdit={edit} onNotice={setNotice} />
        )}
      </div>
    </>
  );
}
