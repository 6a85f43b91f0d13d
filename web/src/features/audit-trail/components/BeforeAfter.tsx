/** changed: recorded on both sides and different; new: recorded after only; same, or before only (the after does not record it). */
type FieldState = 'changed' | 'new' | 'same' | 'before-only';

interface FieldChange {
  field: string;
  before: unknown;
  after: unknown;
  state: FieldState;
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

function stateOf(inBefore: boolean, inAfter: boolean, before: unknown, after: unknown): FieldState {
  if (inBefore && inAfter) return same(before, after) ? 'same' : 'changed';
  return inAfter ? 'new' : 'before-only';
}

const isRecord = (v: unknown): v is Record<string, unknown> => v !== null && typeof v === 'object' && !Array.isArray(v);

/** The fields of before and after, one row each in the order they first appear; a value that is no record is one row. */
export function fieldChanges(before: unknown, after: unknown): FieldChange[] {
  if ((before === null || isRecord(before)) && (after === null || isRecord(after))) {
    const b = before ?? {};
    const a = after ?? {};
    const fields = [...new Set([...Object.keys(b), ...Object.keys(a)])];
    return fields.map((field) => ({ field, before: b[field], after: a[field], state: stateOf(Object.hasOwn(b, field), Object.hasOwn(a, field), b[field], a[field]) }));
  }
  return [{ field: 'value', before, after, state: stateOf(before !== null, after !== null, before, after) }];
}

/** A stored value as a person reads it: text as it is, null as a dash, anything else as compact JSON. */
function shown(v: unknown): string {
  if (v === null) return '—';
  if (typeof v === 'string') return v;
  return JSON.stringify(v);
}

const marker: Record<FieldState, string | null> = { changed: 'changed', new: 'new', same: null, 'before-only': null };

/** A side that does not record the field says so, rather than show an empty value that was never there. */
function Value({ v, recorded, struck }: { v: unknown; recorded: boolean; struck?: boolean }) {
  if (!recorded) return <span className="font-sans text-zinc-500 italic">not recorded</span>;
  return struck ? <s className="decoration-zinc-500">{shown(v)}</s> : <>{shown(v)}</>;
}

/**
 * Before and after side by side, a field a row. A changed or new field is said in words ("changed",
 * "new") and set in bold, with a tint only as a third cue: the change reads in print and without colour too.
 */
export function BeforeAfter({ before, after }: { before: unknown; after: unknown }) {
  const rows = fieldChanges(before, after);
  if (before === null && after === null) return <p className="text-sm text-zinc-600">This event records no values, only that it happened.</p>;
  const changedCount = rows.filter((r) => marker[r.state]).length;
  return (
    <div className="overflow-x-auto">
      <table className="w-full table-fixed border-collapse text-left text-sm">
        <caption className="mb-1 text-left text-sm text-zinc-600">
          {changedCount} of {rows.length} field{rows.length === 1 ? '' : 's'} changed or new
        </caption>
        <colgroup>
          <col className="w-1/5" />
          <col className="w-2/5" />
          <col className="w-2/5" />
        </colgroup>
        <thead className="bg-zinc-100/80 text-zinc-700">
          <tr>
            <th scope="col" className="border-b border-zinc-200 px-3 py-2 font-semibold">
              Field
            </th>
            <th scope="col" className="border-b border-zinc-200 px-3 py-2 font-semibold">
              Before
            </th>
            <th scope="col" className="border-b border-zinc-200 px-3 py-2 font-semibold">
              After
            </th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r) => {
            const changed = marker[r.state] !== null;
            return (
              <tr key={r.field} className={changed ? 'bg-amber-50' : undefined} data-changed={changed || undefined}>
                <th scope="row" className="border-b border-zinc-100 px-3 py-1.5 align-top font-normal [overflow-wrap:anywhere]">
                  <span className={changed ? 'font-semibold' : undefined}>{r.field}</span>
                  {changed && (
                    <span className="ml-2 rounded-sm border border-amber-400 px-1 text-xs font-semibold tracking-wide text-amber-900 uppercase">{marker[r.state]}</span>
                  )}
                </th>
                <td className="border-b border-zinc-100 px-3 py-1.5 align-top font-mono text-xs whitespace-pre-wrap [overflow-wrap:anywhere]">
                  <Value v={r.before} recorded={r.state !== 'new'} struck={r.state === 'changed'} />
                </td>
                <td className={`border-b border-zinc-100 px-3 py-1.5 align-top font-mono text-xs whitespace-pre-wrap [overflow-wrap:anywhere] ${changed ? 'font-bold' : ''}`}>
                  <Value v={r.after} recorded={r.state !== 'before-only'} />
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
