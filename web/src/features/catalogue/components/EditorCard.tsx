import { useEffect, useRef, type ReactNode } from 'react';
import { Card } from '@web/components/ui/Card';

/** The add or change form above a list: brought into view when it opens, since "Edit" may sit far down the list. */
export function EditorCard({ title, children }: { title: string; children: ReactNode }) {
  const ref = useRef<HTMLDivElement>(null);
  useEffect(() => {
    ref.current?.scrollIntoView({ block: 'start' });
    ref.current?.querySelector<HTMLElement>('input:not([readonly]), select, textarea')?.focus({ preventScroll: true });
  }, []);
  return (
    <div ref={ref} className="scroll-mt-20">
      <Card title={title}>{children}</Card>
    </div>
  );
}
