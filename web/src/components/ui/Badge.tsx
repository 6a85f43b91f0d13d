import type { ReactNode } from 'react';
import { cx } from './cx';

type Tone = 'neutral' | 'accent' | 'positive' | 'warning' | 'negative';

const tones: Record<Tone, string> = {
  neutral: 'bg-zinc-100 text-zinc-700 ring-zinc-300',
  accent: 'bg-accent-50 text-accent-800 ring-accent-200',
  positive: 'bg-emerald-50 text-emerald-800 ring-emerald-200',
  warning: 'bg-amber-50 text-amber-900 ring-amber-300',
  negative: 'bg-red-50 text-red-800 ring-red-200',
};

/** A short state word; the word carries the meaning, the tone only supports it. */
export function Badge({ tone = 'neutral', children }: { tone?: Tone; children: ReactNode }) {
  return (
    <span className={cx('inline-flex shrink-0 items-center rounded-full whitespace-nowrap px-2.5 py-0.5 text-sm font-medium ring-1 ring-inset', tones[tone])}>
      {children}
    </span>
  );
}
