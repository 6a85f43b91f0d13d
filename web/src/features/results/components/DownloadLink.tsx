import type { ReactNode } from 'react';
import { cx } from '@web/components/ui/cx';

/** A file the API serves for download (template, error report, original upload). */
export function DownloadLink({ href, children, className }: { href: string; children: ReactNode; className?: string }) {
  return (
    <a
      href={href}
      download
      className={cx('font-medium text-accent-800 underline underline-offset-2 hover:text-accent-700 focus-visible:outline-2 focus-visible:outline-accent-600', className)}
    >
      {children}
    </a>
  );
}
