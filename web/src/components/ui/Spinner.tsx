import { cx } from './cx';

export function Spinner({ className }: { className?: string }) {
  return (
    <svg viewBox="0 0 24 24" aria-hidden="true" className={cx('animate-spin', className ?? 'size-5')}>
      <circle cx="12" cy="12" r="9" fill="none" stroke="currentColor" strokeOpacity="0.25" strokeWidth="3" />
      <path d="M21 12a9 9 0 0 0-9-9" fill="none" stroke="currentColor" strokeWidth="3" strokeLinecap="round" />
    </svg>
  );
}

/** A region that is still loading, announced to screen readers. */
export function Loading({ label = 'Loading…', className }: { label?: string; className?: string }) {
  return (
    <div role="status" className={cx('flex items-center gap-3 py-10 text-zinc-600', className)}>
      <Spinner className="size-5 text-accent-600" />
      <span>{label}</span>
    </div>
  );
}
