// Field builders every request schema may use, so each input is checked at the edge to its column's
// range and character set: ids fit PostgreSQL's integer, text carries no control characters (a NUL
// would make PostgreSQL answer 500), and every message is plain.
import { z } from 'zod';

/** Largest value of a PostgreSQL integer (serial) column. */
export const MAX_INT32 = 2_147_483_647;

/** The id of a stored record ("NCR id", "Alarm id"): a whole number the database can hold. */
export const recordId = (what: string) =>
  z.coerce
    .number({ message: `${what} must be a number` })
    .int(`${what} must be a whole number`)
    .positive(`${what} must be positive`)
    .max(MAX_INT32, `No such ${what.replace(/ id$/, '').toLowerCase()}`);

/** One line of text (a title, a name): no control characters at all. */
export const lineText = (what: string, o: { min?: number; max: number }) =>
  z
    .string({ message: `Give ${what}` })
    .trim()
    .min(o.min ?? 1, o.min && o.min > 1 ? `Write at least ${o.min} characters for ${what}` : `Give ${what}`)
    .max(o.max, `Keep ${what} under ${o.max} characters`)
    .regex(/^[^\p{Cc}]*$/u, `${what[0].toUpperCase()}${what.slice(1)} may not contain control characters`);

/** Free text of several lines (a description, a note): line breaks and tabs allowed, other control characters not. */
export const noteText = (what: string, o: { min?: number; max: number }) =>
  z
    .string({ message: `Give ${what}` })
    .trim()
    .min(o.min ?? 1, o.min && o.min > 1 ? `Write at least ${o.min} characters for ${what}` : `Give ${what}`)
    .max(o.max, `Keep ${what} under ${o.max} characters`)
    // Any control character other than tab, line feed and carriage return (the class \p{Cc} less those).
    .regex(/^(?:(?![\t\n\r])[^\p{Cc}]|[\t\n\r])*$/u, `${what[0].toUpperCase()}${what.slice(1)} may not contain control characters`);

/** A calendar day at the plant, YYYY-MM-DD. */
export const plantDay = (what: string) => z.iso.date({ message: `Give ${what} as a date (YYYY-MM-DD)` });
