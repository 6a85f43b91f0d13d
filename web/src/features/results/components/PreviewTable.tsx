import type { ParsedFile } from '@shared/ingest';
import { cx } from '@web/components/ui/cx';

export const PREVIEW_ROWS = 20;

/** The first rows of the file as read, numbered like a spreadsheet (the header is row 1). */
export function PreviewTable({ parsed, rowsWithErrors }: { parsed: ParsedFile; rowsWithErrors: ReadonlySet<number> }) {
  const records = parsed.records.slice(0, PREVIEW_ROWS);
  return (
    <div className="overflow-x-auto rounded-lg border border-zinc-200 bg-white">
      <table className="w-full border-collapse text-left text-sm">
        <caption className="sr-only">First rows of the file</caption>
        <thead className="bg-zinc-100/80 text-zinc-700">
          <tr>
            <th scope="col" className="border-b border-zinc-200 px-3 py-2 text-right font-semibold">Row</th>
            {parsed.headers.map((header, i) => (
              <th key={`${header}-${i}`} scope="col" className="border-b border-zinc-200 px-3 py-2 font-mono font-semibold whitespace-nowrap">
                {header || <span className="text-zinc-400">(no name)</span>}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {records.map((record, i) => {
            const row = i + 2;
            const bad = rowsWithErrors.has(row);
            return (
              <tr key={row} className={cx('border-b border-zinc-100 last:border-b-0', bad && 'bg-red-50')}>
                <th scope="row" className={cx('px-3 py-1.5 text-right font-mono font-normal whitespace-nowrap', bad ? 'font-semibold text-red-800' : 'text-zinc-500')}>
                  {/* A narrow mark keeps the file's own columns in view on a tablet; screen readers hear the words. */}
                  {bad && (
                    <>
                      <span aria-hidden="true" className="mr-1.5 inline-block rounded bg-red-700 px-1.5 font-sans text-xs font-bold text-white">
                        !
                      </span>
                      <span className="sr-only">needs correcting </span>
                    </>
                  )}
                  {row}
                </th>
                {parsed.headers.map((header, j) => (
                  <td key={`${header}-${j}`} className="px-3 py-1.5 font-mono whitespace-nowrap">
                    {record[header]}
                  </td>
                ))}
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
