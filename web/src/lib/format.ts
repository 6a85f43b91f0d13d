const count = new Intl.NumberFormat('en-GB');

/** A count with thousands grouped, so that a file's 31,843 rows read at a glance. */
export function formatCount(n: number): string {
  return count.format(n);
}

const decimal = new Intl.NumberFormat('en-GB', { maximumFractionDigits: 1 });

/** A file's size as a person reads it: "812 bytes", "14.2 kB", "10.1 MB" (decimal units, as file managers show). */
export function formatBytes(n: number): string {
  if (n < 1000) return `${count.format(n)} bytes`;
  // 999,960 bytes round to 1 MB, not "1,000 kB".
  if (Math.round(n / 100) < 10_000) return `${decimal.format(n / 1000)} kB`;
  return `${decimal.format(n / 1_000_000)} MB`;
}
