import type { ReactNode } from 'react';
import { ApiError, errorMessage } from '@web/lib/http';
import { Alert } from '@web/components/ui/Alert';
import { readRefusal } from '../lib/refusal';

/** One part of the NCR record: a heading, what it holds, and (on screen only) the controls that change it. */
export function Section({ id, title, children, aside }: { id: string; title: string; children: ReactNode; aside?: ReactNode }) {
  return (
    <section aria-labelledby={`ncr-${id}`} data-section={id} className="ncr-section rounded-lg border border-zinc-200 bg-white px-5 py-4">
      <div className="mb-3 flex flex-wrap items-center justify-between gap-2">
        <h2 id={`ncr-${id}`} className="text-lg font-semibold">
          {title}
        </h2>
        {aside}
      </div>
      {children}
    </section>
  );
}

/** A write the server refused: its message, and each detail it gave (the allowed states of a refused step, a refused field). */
export function WriteError({ error }: { error: unknown }) {
  const { lead, points } = readRefusal(errorMessage(error), error instanceof ApiError ? error.details : []);
  return (
    <Alert tone="error" className="print:hidden">
      <p>{lead}</p>
      {points.length > 0 && (
        <ul className="mt-1 list-disc pl-5">
          {points.map((p, i) => (
            <li key={i}>{p}</li>
          ))}
        </ul>
      )}
    </Alert>
  );
}

/** A label and its value in a description list. */
export function Fact({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div>
      <dt className="text-sm text-zinc-600">{label}</dt>
      <dd className="font-medium">{children}</dd>
    </div>
  );
}
