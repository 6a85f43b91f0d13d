import type { Ref, TextareaHTMLAttributes } from 'react';
import { cx } from './cx';

/** A multi-line text control styled like the shared Input, for reasons that take a sentence. */
export function TextArea({
  invalid = false,
  describedBy,
  className,
  ref,
  ...rest
}: TextareaHTMLAttributes<HTMLTextAreaElement> & { invalid?: boolean; describedBy?: string; ref?: Ref<HTMLTextAreaElement> }) {
  return (
    <textarea
      ref={ref}
      rows={3}
      aria-invalid={invalid || undefined}
      aria-describedby={describedBy}
      className={cx(
        'block w-full rounded-md border bg-white px-3 py-2 text-base text-zinc-900 shadow-xs placeholder:text-zinc-400',
        'focus:outline-2 focus:outline-offset-0 focus:outline-accent-500',
        invalid ? 'border-red-600' : 'border-zinc-300',
        className,
      )}
      {...rest}
    />
  );
}
