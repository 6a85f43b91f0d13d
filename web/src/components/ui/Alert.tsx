import type { ReactNode } from 'react';
import { cx } from './cx';

const tones = {
  error: 'border-red-200 bg-red-50 text-red-800',
  success: 'border-emerald-200 bg-emerald-50 text-emerald-900',
} as const;

/** A message the user should read now: errors interrupt (role=alert), confirmations are announced politely. */
export function Alert({ tone, children, className }: { tone: keyof typeof tones; children: ReactNode; className?: string }) {
  return (
    <div role={tone === 'error' ? 'alert' : 'status'} className={cx('rounded-md border px-4 py-3', tones[tone], className)}>
      {children}
    </div>
  );
}
