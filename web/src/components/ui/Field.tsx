import { useId, type InputHTMLAttributes, type ReactNode, type Ref, type SelectHTMLAttributes } from 'react';
import { cx } from './cx';

const control =
  'block w-full rounded-md border bg-white px-3 text-base text-zinc-900 shadow-xs transition-colors ' +
  'placeholder:text-zinc-400 focus:outline-2 focus:outline-offset-0 focus:outline-accent-500 ' +
  'disabled:bg-zinc-100 disabled:text-zinc-500';

function controlClass(invalid: boolean, className?: string) {
  return cx(control, 'h-10', invalid ? 'border-red-600' : 'border-zinc-300', className);
}

export interface FieldProps {
  label: string;
  /** The validation or server message for this field. */
  error?: string;
  hint?: string;
  className?: string;
  /** Renders the control with the ids that tie it to its label, hint and error. */
  children: (ids: { id: string; describedBy: string | undefined; invalid: boolean }) => ReactNode;
}

/** A labelled form control with its hint and error text, wired for screen readers. */
export function Field({ label, error, hint, className, children }: FieldProps) {
  const id = useId();
  const hintId = hint ? `${id}-hint` : undefined;
  const errorId = error ? `${id}-error` : undefined;
  const describedBy = [hintId, errorId].filter(Boolean).join(' ') || undefined;
  return (
    <div className={cx('space-y-1.5', className)}>
      <label htmlFor={id} className="block text-sm font-medium text-zinc-800">
        {label}
      </label>
      {children({ id, describedBy, invalid: !!error })}
      {hint && !error && (
        <p id={hintId} className="text-sm text-zinc-500">
          {hint}
        </p>
      )}
      {error && (
        <p id={errorId} className="text-sm text-red-700 [overflow-wrap:anywhere]">
          {error}
        </p>
      )}
    </div>
  );
}

interface ControlProps {
  invalid?: boolean;
  describedBy?: string;
}

export function Input({
  invalid = false,
  describedBy,
  className,
  ref,
  ...rest
}: InputHTMLAttributes<HTMLInputElement> & ControlProps & { ref?: Ref<HTMLInputElement> }) {
  return <input ref={ref} aria-invalid={invalid || undefined} aria-describedby={describedBy} className={controlClass(invalid, className)} {...rest} />;
}

export function Select({
  invalid = false,
  describedBy,
  className,
  ref,
  children,
  ...rest
}: SelectHTMLAttributes<HTMLSelectElement> & ControlProps & { ref?: Ref<HTMLSelectElement> }) {
  return (
    <select ref={ref} aria-invalid={invalid || undefined} aria-describedby={describedBy} className={controlClass(invalid, cx('pr-8', className))} {...rest}>
      {children}
    </select>
  );
}
