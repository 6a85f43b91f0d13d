import { useMemo, useState } from 'react';
import { formatFigure } from '@shared/figures';
import { formatPlantDateTime, type PlantClock } from '@shared/time';
import {
  createColumnHelper,
  getCoreRowModel,
  getFilteredRowModel,
  getPaginationRowModel,
  getSortedRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import type { CharacteristicChart, ChartPointRecord } from '@shared/schemas/charts';
import { DataTable } from '@web/components/ui/Table';
import { Badge } from '@web/components/ui/Badge';
import { Button } from '@web/components/ui/Button';
import { EmptyState } from '@web/components/ui/EmptyState';
import { shiftName } from '@web/lib/chart-format';
import { ruleLabels, statisticNames } from '@shared/spc';
import { downloadText, pointsCsv } from '../lib/points-csv';

const column = createColumnHelper<ChartPointRecord>();
const PAGE_SIZE = 25;

interface PointsTableProps {
  chart: CharacteristicChart;
  clock: PlantClock;
  canChangeLimits: boolean;
  onReveal: (index: number) => void;
  onOpenLot: (index: number) => void;
  onExclude: (index: number) => void;
  onInclude: (index: number) => void;
}

export function PointsTable({ chart, clock, canChangeLimits, onReveal, onOpenLot, onExclude, onInclude }: PointsTableProps) {
  const { decimals, unit, chartType, subgroupSize } = chart.characteristic;
  const names = statisticNames[chartType];
  const [sorting, setSorting] = useState<SortingState>([{ id: 'producedAt', desc: true }]);
  const [onlyFlagged, setOnlyFlagged] = useState(false);

  const columns = useMemo(
    () => [
      column.accessor('lotNumber', {
        header: 'Lot',
        cell: (info) => (
          <button
            type="button"
            className="font-mono text-sm font-medium whitespace-nowrap text-accent-700 underline underline-offset-2 hover:text-accent-800"
            onClick={() => onOpenLot(info.row.original.index)}
          >
            {info.getValue()}
          </button>
        ),
      }),
      column.accessor('producedAt', {
        header: 'Produced',
        cell: (info) => (
          <span className="font-mono text-sm whitespace-nowrap">
            {formatPlantDateTime(info.getValue(), clock)}
            <span className="block font-sans text-zinc-500">{shiftName(info.row.original.shift)}</span>
          </span>
        ),
      }),
      column.accessor((p) => p.values.join(' '), {
        id: 'values',
        header: `Values (${unit})`,
        enableSorting: false,
        cell: (info) => <span className="font-mono text-sm">{info.row.original.values.map((v) => formatFigure(v, decimals)).join(' · ')}</span>,
      }),
      column.accessor('location', { header: names.location, cell: (info) => formatFigure(info.getValue(), decimals + (subgroupSize > 1 ? 1 : 0)), meta: { numeric: true } }),
      column.accessor((p) => p.dispersion ?? -1, {
        id: 'dispersion',
        header: names.dispersion,
        cell: (info) => formatFigure(info.row.original.dispersion, decimals + 1),
        meta: { numeric: true },
      }),
      column.accessor((p) => p.rules.length * 4 + (p.outOfSpec ? 2 : 0) + (p.excluded ? 1 : 0), {
        id: 'state',
        header: 'State',
        cell: (info) => <PointState point={info.row.original} />,
      }),
      column.display({
        id: 'actions',
        header: 'Actions',
        cell: (info) => {
          const p = info.row.original;
          return (
            <div className="flex flex-wrap gap-1.5">
              <Button size="sm" variant="secondary" onClick={() => onReveal(p.index)} aria-label={`Show lot ${p.lotNumber} on the chart`}>
                Show on chart
              </Button>
              {canChangeLimits &&
                (p.excluded ? (
                  <Button size="sm" variant="quiet" onClick={() => onInclude(p.index)} aria-label={`Take lot ${p.lotNumber} back into the limits`}>
                    Take back in
                  </Button>
                ) : (
                  <Button size="sm" variant="quiet" onClick={() => onExclude(p.index)} aria-label={`Exclude lot ${p.lotNumber} from the limits`}>
                    Exclude
                  </Button>
                ))}
            </div>
          );
        },
      }),
    ],
    [decimals, unit, names, subgroupSize, clock, canChangeLimits, onReveal, onOpenLot, onExclude, onInclude],
  );

  const data = useMemo(() => (onlyFlagged ? chart.points.filter((p) => p.rules.length > 0 || p.outOfSpec || p.excluded) : chart.points), [chart, onlyFlagged]);

  const table = useReactTable({
    data,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
    getFilteredRowModel: getFilteredRowModel(),
    getPaginationRowModel: getPaginationRowModel(),
    initialState: { pagination: { pageSize: PAGE_SIZE } },
    autoResetPageIndex: true,
  });

  const page = table.getState().pagination.pageIndex;
  const pages = table.getPageCount();

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-3">
        <label className="flex items-center gap-2 text-sm font-medium text-zinc-800">
          <input type="checkbox" className="size-4 accent-accent-700" checked={onlyFlagged} onChange={(e) => setOnlyFlagged(e.target.checked)} />
          Only points with a signal, outside specification or excluded
        </label>
        <p className="figures text-sm text-zinc-600" aria-live="polite">
          {data.length === chart.points.length ? `${chart.points.length} points` : `${data.length} of ${chart.points.length} points`}
        </p>
        <Button
          variant="secondary"
          size="sm"
          className="ml-auto"
          onClick={() => downloadText(pointsCsv(chart, clock.timeZone), `${chart.characteristic.code}-chart-points.csv`)}
        >
          Download CSV
        </Button>
      </div>
      <DataTable
        table={table}
        caption={`Points of the ${chart.characteristic.name} chart`}
        empty={<EmptyState title="No point matches">Clear the tick box to see every point.</EmptyState>}
      />
      {pages > 1 && (
        <nav aria-label="Pages of points" className="flex items-center justify-end gap-2">
          <Button size="sm" variant="secondary" onClick={() => table.setPageIndex(0)} disabled={!table.getCanPreviousPage()}>
            First page
          </Button>
          <Button size="sm" variant="secondary" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
            Previous
          </Button>
          <span className="figures px-2 text-sm text-zinc-700">
            Page {page + 1} of {pages}
          </span>
          <Button size="sm" variant="secondary" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
            Next
          </Button>
        </nav>
      )}
    </div>
  );
}

function PointState({ point }: { point: ChartPointRecord }) {
  if (!point.rules.length && !point.outOfSpec && !point.excluded) return <span className="text-sm text-zinc-500">In control</span>;
  return (
    <div className="flex flex-wrap gap-1">
      {point.rules.map((rule) => (
        <Badge key={rule} tone="negative">
          ▲ {ruleLabels[rule]}
        </Badge>
      ))}
      {point.outOfSpec && <Badge tone="warning">◆ Outside specification</Badge>}
      {point.excluded && <Badge tone="neutral">▢ Excluded</Badge>}
    </div>
  );
}
