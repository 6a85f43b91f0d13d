import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { createColumnHelper } from '@tanstack/react-table';
import { characteristicLabel } from '@web/lib/names';
import { specLimitsText } from '@web/lib/spec';
import { statisticNames } from '@shared/spc';
import type { Notice } from '@web/components/ui/Notice';
import type { CharacteristicView } from '@shared/schemas/catalogue';
import { useUpdateCharacteristic } from '../api/catalogue';
import { shortMethodName } from '../lib/suggest';
import { actionsColumn, statusColumn, type Consequences } from './RowActions';
import { DataTable } from '@web/components/ui/Table';
import { Select } from '@web/components/ui/Field';
import { TableFilter, useFilteredTable } from '@web/components/ui/FilteredTable';
import { EmptyState } from '@web/components/ui/EmptyState';

const column = createColumnHelper<CharacteristicView>();

/** "X̄–R", "X̄–S", "I–MR": the plotted statistics of the two charts. */
const chartShortName = (c: CharacteristicView) => `${statisticNames[c.chartType].location}–${statisticNames[c.chartType].dispersion}`;

const ruleSetShortLabels: Record<CharacteristicView['ruleSet'], string> = { we: 'Western Electric', extended: 'Western Electric + extended' };

function matches(c: CharacteristicView, query: string): boolean {
  const needle = query.trim().toLowerCase();
  return [c.code, c.name, c.productCode, c.testMethodName].some((text) => text.toLowerCase().includes(needle));
}

const consequences: Consequences = {
  deactivate: (
    <p>
      Uploads and manual entry refuse new results for it and the nightly SPC run leaves it out. Its results, charts, specification and audit trail
      stay, and it can be reactivated at any time.
    </p>
  ),
  reactivate: <p>Uploads accept its results again and the next SPC run charts it.</p>,
  deactivated: (code: string) => `${code} is deactivated: uploads refuse it and the SPC run leaves it out. Its results and charts stay.`,
};

export function CharacteristicsTable({
  characteristics,
  onEdit,
  onNotice,
}: {
  characteristics: CharacteristicView[];
  onEdit: (characteristic: CharacteristicView) => void;
  onNotice: (notice: Notice) => void;
}) {
  const { mutateAsync: update } = useUpdateCharacteristic();
  const [status, setStatus] = useState<'all' | 'active' | 'inactive'>('all');
  const listed = useMemo(() => characteristics.filter((c) => status === 'all' || c.active === (status === 'active')), [characteristics, status]);

  const columns = useMemo(
    () => [
      column.accessor('code', {
        header: 'Characteristic',
        cell: (info) => (
          <>
            <span className="block font-mono text-sm">{info.getValue()}</span>
            <span className="block text-sm text-zinc-600">
              <span className="font-mono">{info.row.original.productCode}</span> · {characteristicLabel(info.row.original)}
            </span>
          </>
        ),
      }),
      column.accessor((c) => shortMethodName(c.testMethodName), {
        id: 'method',
        header: 'Test',
        cell: (info) => {
          const c = info.row.original;
          return (
            <span className="text-sm">
              {info.getValue()}
              {c.ageDays !== null && <span className="whitespace-nowrap"> · {c.ageDays} d</span>}
              <span className="block font-mono text-zinc-600">{c.unit}</span>
            </span>
          );
        },
      }),
      column.accessor('subgroupSize', { header: 'Subgroup', meta: { numeric: true } }),
      column.accessor(chartShortName, {
        id: 'chart',
        header: 'Chart',
        cell: (info) => (
          <span className="text-sm">
            <span className="font-mono whitespace-nowrap">{info.getValue()}</span>
            <span className="block text-zinc-600">{ruleSetShortLabels[info.row.original.ruleSet]}</span>
          </span>
        ),
      }),
      column.accessor((c) => c.spec?.revision ?? 0, {
        id: 'spec',
        header: 'Specification',
        cell: (info) => {
          const c = info.row.original;
          return (
            <Link to={`/records/specifications/${c.id}`} className="figures text-sm text-accent-800 underline underline-offset-2">
              {c.spec ? (
                <>
                  {specLimitsText(c.spec, c.unit, c.decimals)}
                  <span className="block">revision {c.spec.revision}</span>
                </>
              ) : (
                'None in force: add one'
              )}
            </Link>
          );
        },
      }),
      statusColumn(column),
      actionsColumn(column, { onEdit, onNotice, consequences, setActive: (id, active) => update({ id, changes: { active } }) }),
    ],
    [onEdit, onNotice, update],
  );

  const { table, filter, setFilter, shown } = useFilteredTable({ data: listed, columns, matches });

  return (
    <div className="space-y-3">
      <TableFilter
        id="characteristic-filter"
        placeholder="Code, name, product or method"
        value={filter}
        onChange={setFilter}
        shown={shown}
        total={characteristics.length}
        noun="characteristics"
      >
        <Select aria-label="Status" value={status} onChange={(event) => setStatus(event.target.value as typeof status)} className="max-w-44">
          <option value="all">All statuses</option>
          <option value="active">Active</option>
          <option value="inactive">Deactivated</option>
        </Select>
      </TableFilter>
      <DataTable
        table={table}
        caption="Characteristics"
        empty={<EmptyState title="No characteristic matches">Clear the filter to see them all.</EmptyState>}
      />
    </div>
  );
}
