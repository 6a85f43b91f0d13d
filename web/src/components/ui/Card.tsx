import type { ReactNode } from 'react';
import { cx } from './cx';

export function Card({ title, className, children }: { title?: string; className?: string; children: ReactNode }) {
  return (
    <section className={cx('rounded-lg border border-zinc-200 bg-white shadow-xs', className)}>
      {title && (
        <header className="border-b border-zinc-200 px-5 py-4">
          <h2 className="text-lg font-semibold text-zinc-900">{title}</h2>
        </header>
      )}
      <div className="px-5 py-4">{children}</div>
    </section>
  );
}
