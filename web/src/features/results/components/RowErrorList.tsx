import type { RowError } from '@shared/ingest';

const SHOWN = 200;

/** Rows to correct, in the file's own line numbers and column names. */
export function RowErrorList({ errors, caption }: { errors: readonly RowError[]; caption: string }) {
  const shown = errors.slice(0, SHOWN);
  return (
    <div className="overflow-x-auto rounded-lg border border-red-200 bg-white">
      <table className="w-full border-collapse text-left">
        <caption className="px-3 py-2 text-left font-semibold text-red-900">{caption}</caption>
        <thead className="bg-red-50 text-sm text-red-900">
          <tr>
            <th scope="col" className="w-20 border-y border-red-200 px-3 py-2 text-right font-semibold">Row</th>
            <th scope="col" className="border-y border-red-200 px-3 py-2 font-semibold">Column</th>
            <th scope="col" className="border-y border-red-200 px-3 py-2 font-semibold">What to correct</th>
          </tr>
        </thead>
        <tbody>
          {shown.map((error, i) => (
            <tr key={`${error.row}-${error.column}-${i}`} className="border-b border-red-100 align-top last:border-b-0">
              <td className="px-3 py-1.5 text-right font-mono">{error.row}</td>
              <td className="px-3 py-1.5 font-mono text-sm [overflow-wrap:break-word]">{error.column || '—'}</td>
              <td className="px-3 py-1.5 [overflow-wrap:break-word]">{error.message}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {errors.length > SHOWN && (
        <p className="border-t border-red-100 px-3 py-2 text-sm text-red-900">
          … and <span className="font-mono">{errors.length - SHOWN}</span> more. Correct these first, then choose the file again.
        </p>
      )}
    </div>
  );
}
