import { useCallback, useState } from 'react';
import type { Notice } from '@web/components/ui/Notice';
import type { ProductView } from '@shared/schemas/catalogue';
import { useCatalogueLines, useCatalogueProducts } from '../api/catalogue';
import { ProductForm } from '../components/ProductForm';
import { ProductsTable } from '../components/ProductsTable';
import { EditorCard } from '../components/EditorCard';
import { PageHeader } from '@web/components/ui/PageHeader';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

/** /admin/catalogue/products: the products the plant makes, each on one line. */
export default function ProductsPage() {
  const products = useCatalogueProducts();
  const lines = useCatalogueLines();
  const [editing, setEditing] = useState<'new' | ProductView | null>(null);
  const [notice, setNotice] = useState<Notice | null>(null);
  const edit = useCallback((p: ProductView) => {
    setNotice(null);
    setEditing(p);
  }, []);

  const failed = [products, lines].find((q) => q.isError);
  const header = (
    <PageHeader
      title="Products"
      description="The products the plant makes and the line each is made on. Products are never deleted: deactivate one that is no longer made."
      actions={
        <Button onClick={() => setEditing('new')} disabled={editing === 'new' || !lines.data?.length}>
          Add a product
        </Button>
      }
    />
  );
  if (failed) return <>{header}<ErrorState title="Could not load the products" error={failed.error} onRetry={() => [products, lines].forEach((q) => q.refetch())} /></>;
  if (!products.data || !lines.data) return <>{header}<Loading label="Loading the products…" /></>;

  const families = [...new Set(products.data.map((p) => p.family))].sort();
  return (
    <>
      {header}
      <div className="space-y-4">
        {editing && (
          <EditorCard key={editing === 'new' ? 'new' : editing.id} title={editing === 'new' ? 'Add a product' : `Change ${editing.code}`}>
            <ProductForm
              product={editing === 'new' ? undefined : editing}
              lines={lines.data}
              families={families}
              onSaved={(p) => {
                setEditing(null);
                setNotice({ tone: 'success', text: editing === 'new' ? `${p.code} added. Add its characteristics next.` : `${p.code} saved.` });
              }}
              onCancel={() => setEditing(null)}
            />
          </EditorCard>
        )}
        {notice && <Alert tone={notice.tone}>{notice.text}</Alert>}
        {lines.data.length === 0 ? (
          <EmptyState title="No production line yet">Add a line first, under Production lines.</EmptyState>
        ) : products.data.length === 0 ? (
          <EmptyState title="No product yet">Add the first one with “Add a product”.</EmptyState>
        ) : (
          <ProductsTable products={products.data} onEdit={edit} onNotice={setNotice} />
        )}
      </div>
    </>
  );
}
