// What a person types into a plant date or date-time field, read the way the plant writes dates
// (plants.date_format) in the plant's zone, whatever the browser's. The PlantDateInput widget shows the
// format; these helpers read the text and give the one message a field shows when it cannot be read.
import { z } from 'zod';
import { addDays } from 'date-fns';
import { tz } from '@date-fns/tz';
import { dateFormatHint, formatPlantDate, formatPlantDateTime, plantIso, readPlantDate, readPlantDateTime, type PlantClock } from '@shared/time';

/** A field takes a day ("30/11/2026") or a day and a time of day ("30/11/2026 06:15"). */
export type PlantDateKind = 'date' | 'dateTime';

/** What the field asks for, e.g. "dd/mm/yyyy hh:mm": its placeholder. */
export function plantDatePlaceholder(kind: PlantDateKind, clock: PlantClock): string {
  return kind === 'date' ? dateFormatHint(clock.dateFormat) : `${dateFormatHint(clock.dateFormat)} hh:mm`;
}

/** An instant as the field shows it, e.g. "30/11/2026 06:15" (a default value, or "now"). */
export function plantDateValue(kind: PlantDateKind, instant: Date | string, clock: PlantClock): string {
  return kind === 'date' ? formatPlantDate(instant, clock) : formatPlantDateTime(instant, clock);
}

// The example the message gives is a fixed day whose day and month cannot be mistaken for each other.
const exampleInstant = '2026-11-30T06:15:00Z';

/** The message under a field whose text is not a date in the plant's format. */
export function plantDateError(kind: PlantDateKind, clock: PlantClock): string {
  const example = plantDateValue(kind, exampleInstant, { ...clock, timeZone: 'UTC' });
  return `Type the ${kind === 'date' ? 'date' : 'date and time'} as ${plantDatePlaceholder(kind, clock)}, e.g. ${example}`;
}

/** The text of a field as an instant: a day reads as the plant's midnight starting it; null when unreadable. */
export function readPlantInput(kind: PlantDateKind, text: string, clock: PlantClock): Date | null {
  return kind === 'date' ? readPlantDate(text, clock) : readPlantDateTime(text, clock);
}

/**
 * A form field (zod) that takes the typed text and gives the instant as ISO 8601 with the plant's offset,
 * undefined when left blank, or the plant-format message under the field when it cannot be read.
 * `required` is the message for a blank field that must be filled.
 */
export function plantDateText(kind: PlantDateKind, clock: PlantClock, required?: string) {
  return z.string().transform((text, ctx): string | undefined => {
    if (text.trim() === '') {
      if (required) ctx.addIssue({ code: 'custom', message: required });
      return undefined;
    }
    const instant = readPlantInput(kind, text, clock);
    if (!instant) {
      ctx.addIssue({ code: 'custom', message: plantDateError(kind, clock) });
      return z.NEVER;
    }
    return plantIso(instant, clock.timeZone);
  });
}

/** The start of the plant's next day after an instant: a period "to 30/11/2026" runs to the end of that day, clock changes included. */
export function plantDayAfter(instant: Date, clock: PlantClock): Date {
  return new Date(addDays(instant, 1, { in: tz(clock.timeZone) }).getTime());
}
