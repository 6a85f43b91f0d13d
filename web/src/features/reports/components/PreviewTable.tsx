import { Fragment } from 'react';
import { PlainTable } from '@web/components/ui/Table';
import { formatFigure, formatQuantity } from '@shared/figures';
import type { CapabilityReportPreview } from '@shared/schemas/reports';
import type { Interval } from '@shared/spc';

const headings = ['Characteristic', 'n', 'Subgroups', 'Mean', 'Cp', 'Cpk', 'Pp', 'Ppk', 'Signals', 'NCRs'] as const;

const index = (v: number | null | undefined) => formatFigure(v, 2);
const interval = (ci: Interval | null | undefined) => (ci ? `95 %: ${index(ci[0])} to ${index(ci[1])}` : undefined);

/** Each characteristic's figures as the report will carry them, one row each, with the engine's cautions in words on a row of their own below. */
export function PreviewTable({ preview }: { preview: CapabilityReportPreview }) {
  return (
    <PlainTable caption="The report's figures per characteristic" headings={headings}>
      {preview.characteristics.map((c) => {
        const cap = c.capability;
        const cautions = c.subgroups === 0 ? ['No results in this period.'] : c.warnings;
        return (
          <Fragment key={c.id}>
            <tr className={cautions.length ? 'align-top' : 'border-b border-zinc-200 align-top last:border-0'}>
              <th scope="row" className="px-3 py-2 text-left font-medium whitespace-nowrap">
                {c.code}
                <span className="block text-sm font-normal text-zinc-600">{c.name}</span>
              </th>
              <td className="px-3 py-2 tabular-nums">{cap?.n ?? 0}</td>
              <td className="px-3 py-2 tabular-nums">
                {c.subgroups}
                {c.excluded > 0 && <span className="block text-sm text-zinc-600">{c.excluded} excluded</span>}
              </td>
              <td className="px-3 py-2 whitespace-nowrap tabular-nums">{formatQuantity(cap?.mean, c.decimals, c.unit)}</td>
              {(['cp', 'cpk', 'pp', 'ppk'] as const).map((k) => (
                <td key={k} className="px-3 py-2 tabular-nums" title={interval(cap?.[`${k}Ci95`])}>
                  {index(cap?.[k])}
                </td>
              ))}
              <td className="px-3 py-2 whitespace-nowrap tabular-nums">
                {c.signals.total}
                {c.signals.open > 0 && <span className="block text-sm text-zinc-600">{c.signals.open} open</span>}
              </td>
              <td className="px-3 py-2 tabular-nums">{c.ncrs}</td>
            </tr>
            {cautions.length > 0 && (
              <tr className="border-b border-zinc-200 last:border-0">
                <td colSpan={headings.length} className="px-3 pb-3 text-sm text-zinc-700">
                  <span className="sr-only">Cautions for {c.code}: </span>
                  <ul className="list-disc space-y-0.5 pl-5">
                    {cautions.map((w) => (
                      <li key={w}>{w}</li>
                    ))}
                  </ul>
                </td>
              </tr>
            )}
          </Fragment>
        );
      })}
    </PlainTable>
  );
}
