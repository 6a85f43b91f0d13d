const date = new Intl.DateTimeFormat('en-GB', { day: '2-digit', month: 'short', year: 'numeric' });

/** A timestamp from the API (ISO 8601) as a day in the plant's local time, e.g. "01 Dec 2025". */
export function formatDate(iso: string): string {
  const value = new Date(iso);
  return Number.isNaN(value.getTime()) ? iso : date.format(value);
}

const count = new Intl.NumberFormat('en-GB');

/** A count with thousands grouped, so that a file's 31,843 rows read at a glance. */
export function formatCount(n: number): string {
  return count.format(n);
}
