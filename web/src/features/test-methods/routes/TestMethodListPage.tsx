import { useMemo } from 'react';
import { Link } from 'react-router-dom';
import { createColumnHelper, getCoreRowModel, useReactTable } from '@tanstack/react-table';
import { useTestMethods, type TestMethodEntry } from '@web/lib/test-methods';
import { stateLabels } from '../lib/formulas';
import { PageHeader } from '@web/components/ui/PageHeader';
import { DataTable } from '@web/components/ui/Table';
import { Loading } from '@web/components/ui/Spinner';
import { ErrorState } from '@web/components/ui/ErrorState';
import { EmptyState } from '@web/components/ui/EmptyState';

const column = createColumnHelper<TestMethodEntry>();

const rawReading: Record<NonNullable<TestMethodEntry['rawLoad']>, string> = {
  flexural: 'The result, or the breaking load in kN or N',
  compressive: 'The result, or the breaking load in kN or N',
  'pull-off': 'The result, or the pull-off force in kN or N',
};

export default function TestMethodListPage() {
  const methods = useTestMethods();
  const columns = useMemo(
    () => [
      column.accessor('name', {
        header: 'Method',
        cell: (info) => (
          <Link to={`/test-methods/${info.row.original.code}`} className="font-medium text-accent-800 underline-offset-2 hover:underline focus-visible:outline-2 focus-visible:outline-accent-600">
            {info.getValue()}
          </Link>
        ),
      }),
      column.accessor('standard', { header: 'Standard' }),
      column.accessor((m) => stateLabels[m.state], { id: 'state', header: 'Specimens' }),
      column.accessor('unit', { header: 'Unit', cell: (info) => <span className="font-mono">{info.getValue()}</span> }),
      column.accessor((m) => (m.rawLoad ? rawReading[m.rawLoad] : 'The result itself'), { id: 'entry', header: 'Entered as' }),
    ],
    [],
  );
  const table = useReactTable({ data: methods.data ?? [], columns, enableSorting: false, getCoreRowModel: getCoreRowModel() });

  return (
    <>
      <PageHeader
        title="Test methods"
        description="How the lab tests each characteristic, and the handling cautions of each method. The cautions are reminders; the product's safety data sheet, the test standard and local regulations apply."
      />
      {methods.isPending ? (
        <Loading label="Loading test methods…" />
      ) : methods.isError ? (
        <ErrorState title="Could not load the test methods" error={methods.error} onRetry={() => methods.refetch()} />
      ) : (
        <DataTable table={table} caption="Test methods of the laboratory" empty={<EmptyState title="No test methods are set up" />} />
      )}
    </>
  );
}
