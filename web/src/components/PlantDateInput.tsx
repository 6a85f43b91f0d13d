import type { InputHTMLAttributes, Ref } from 'react';
import { FALLBACK_PLANT_CLOCK } from '@shared/time';
import { usePlantClock } from '@web/lib/catalogue';
import { plantDatePlaceholder, type PlantDateKind } from '@web/lib/plant-dates';
import { Field, Input } from './ui/Field';

// A date or date-time typed as the plant writes it ("30/11/2026 06:15"), never the browser's locale
// picker: the same text on every machine, read in the plant's zone. The page footer names the zone once.

type InputProps = Omit<InputHTMLAttributes<HTMLInputElement>, 'type' | 'placeholder'> & { ref?: Ref<HTMLInputElement> };

// Until the plant has loaded, the placeholder shows the default format; reading waits for the clock anyway.

/** The bare text box, for a control that brings its own label (inside `<Field>`): `{(ids) => <PlantDateInput kind="date" {...ids} {...register('from')} />}`. */
export function PlantDateInput({
  kind,
  invalid,
  describedBy,
  className,
  ...rest
}: InputProps & { kind: PlantDateKind; invalid?: boolean; describedBy?: string; id?: string }) {
  const clock = usePlantClock().data ?? FALLBACK_PLANT_CLOCK;
  return (
    <Input
      type="text"
      inputMode="numeric"
      autoComplete="off"
      spellCheck={false}
      placeholder={plantDatePlaceholder(kind, clock)}
      invalid={invalid}
      describedBy={describedBy}
      className={className ?? (kind === 'date' ? 'max-w-40' : 'max-w-52')}
      {...rest}
    />
  );
}

export interface PlantDateFieldProps extends InputProps {
  label: string;
  kind: PlantDateKind;
  /** The message under the field; `plantDateText()` from `@web/lib/plant-dates` gives the plant-format one. */
  error?: string;
  /** Said after the format, e.g. "Empty: from now." */
  hint?: string;
  className?: string;
}

/**
 * A labelled plant date or date-time field with the format as its hint: spread `register('x')` or
 * `value` / `onChange` into it, and read it with `plantDateText(kind, clock)` in the form's schema.
 */
export function PlantDateField({ label, kind, error, hint, className, ...input }: PlantDateFieldProps) {
  const clock = usePlantClock().data ?? FALLBACK_PLANT_CLOCK;
  const format = `As ${plantDatePlaceholder(kind, clock)}.`;
  return (
    <Field label={label} error={error} hint={hint ? `${format} ${hint}` : format} className={className}>
      {(ids) => <PlantDateInput kind={kind} {...ids} {...input} />}
    </Field>
  );
}
