import type { ReactNode } from 'react';

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-zinc-300 px-5 py-10 text-center">
      <p className="font-medium text-zinc-800">{title}</p>
      {children && <div className="mt-1 text-zinc-600">{children}</div>}
    </div>
  );
}
