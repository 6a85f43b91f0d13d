import { useMemo, useState } from 'react';
import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import type { Notice } from '@web/components/ui/Notice';
import type { LineView } from '@shared/schemas/catalogue';
import { useCatalogueLines, useCatalogueProducts, useUpdateLine } from '../api/catalogue';
import { LineForm } from '../components/LineForm';
import { actionsColumn, statusColumn, type Consequences } from '../components/RowActions';
import { EditorCard } from '../components/EditorCard';
import { PageHeader } from '@web/components/ui/PageHeader';
import { DataTable } from '@web/components/ui/Table';
import { Button } from '@web/components/ui/Button';
import { Alert } from '@web/components/ui/Alert';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

const column = createColumnHelper<LineView & { products: string[] }>();

const consequences: Consequences = {
  deactivate: (
    <p>
      Uploads and manual entry refuse new lots and results on it, and manual entry no longer offers it. Its lots, results and charts stay, and it can be
      reactivated at any time.
    </p>
  ),
  reactivate: <p>Uploads and manual entry accept results on it again.</p>,
  deactivated: (code: string) => `${code} is deactivated: uploads and manual entry refuse results on it.`,
};

/** /admin/catalogue/lines: the production lines lots are made on. */
export default function LinesPage() {
  const lines = useCatalogueLines();
  const products = useCatalogueProducts();
  const [editing, setEditing] = useState<'new' | LineView | null>(null);
  const [notice, setNotice] = useState<Notice | null>(null);
  const { mutateAsync: update } = useUpdateLine();

  const rows = useMemo(
    () => (lines.data ?? []).map((line) => ({ ...line, products: (products.data ?? []).filter((p) => p.lineCode === line.code).map((p) => p.code) })),
    [lines.data, products.data],
  );
  const columns = useMemo(
    () => [
      column.accessor('code', { header: 'Code', cell: (info) => <span className="font-mono">{info.getValue()}</span> }),
      column.accessor('name', { header: 'Name' }),
      column.accessor((line) => line.products.join(', '), {
        id: 'products',
        header: 'Products made on it',
        cell: (info) => <span className="font-mono text-sm">{info.getValue() || '–'}</span>,
      }),
      statusColumn(column),
      actionsColumn(column, {
        onEdit: (line) => {
          setNotice(null);
          setEditing(line);
        },
        onNotice: setNotice,
        consequences,
        setActive: (id, active) => update({ id, changes: { active } }),
      }),
    ],
    [update],
  );
  const table = useReactTable({ data: rows, columns, getCoreRowModel: getCoreRowModel() });

  const failed = [lines, products].find((q) => q.isError);
  const header = (
    <PageHeader
      title="Production lines"
      description="The lines lots are made on. A line is never deleted but deactivated; once lots were made on it its code stays, and its name may change."
      actions={
        <Button onClick={() => setEditing('new')} disabled={editing === 'new'}>
          Add a line
        </Button>
      }
    />
  );
  if (failed) return <>{header}<ErrorState title="Could not load the lines" error={failed.error} onRetry={() => [lines, products].forEach((q) => q.refetch())} /></>;
  if (!lines.data || !products.data) return <>{header}<Loading label="Loading the lines…" /></>;

  return (
    <>
      {header}
      <div className="space-y-4">
        {editing && (
          <EditorCard key={editing === 'new' ? 'new' : editing.id} title={editing === 'new' ? 'Add a line' : `Change line ${editing.code}`}>
            <LineForm
              line={editing === 'new' ? undefined : editing}
              onSaved={(line) => {
                setEditing(null);
                setNotice({ tone: 'success', text: editing === 'new' ? `Line ${line.code} added. Products can now be made on it.` : `Line ${line.code} saved.` });
              }}
              onCancel={() => setEditing(null)}
            />
          </EditorCard>
        )}
        {notice && <Alert tone={notice.tone}>{notice.text}</Alert>}
        {lines.data.length === 0 ? <EmptyState title="No production line yet">Add the first one with “Add a line”.</EmptyState> : <DataTable table={table} caption="Production lines" />}
      </div>
    </>
  );
}
