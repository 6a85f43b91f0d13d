// Figures as people read them and as exports write them, always to the characteristic's own decimals,
// so a density reads "1,501 kg/m³" in the alarm, the chart, the e-mail and the CSV alike.

const grouped = new Map<number, Intl.NumberFormat>();

/** A measured figure for people: thousands grouped, the characteristic's decimals; an en dash when there is none. */
export function formatFigure(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '–';
  const places = Math.max(0, Math.min(6, Math.trunc(decimals)));
  let format = grouped.get(places);
  if (!format) {
    format = new Intl.NumberFormat('en-GB', { minimumFractionDigits: places, maximumFractionDigits: places });
    grouped.set(places, format);
  }
  // Intl rounds half away from zero on the decimal text, so 30.849999999999994 to one place reads 30.8.
  return format.format(value);
}

/** A figure with its unit, e.g. "1,501 kg/m³"; a unit-less figure stands alone. */
export function formatQuantity(value: number | null | undefined, decimals: number, unit: string | null | undefined): string {
  const text = formatFigure(value, decimals);
  return unit && text !== '–' ? `${text} ${unit}` : text;
}

/** A figure for a CSV cell: no grouping, the characteristic's decimals, no floating-point noise; empty when none. */
export function csvFigure(value: number | null | undefined, decimals: number): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return '';
  const places = Math.max(0, Math.min(6, Math.trunc(decimals)));
  const text = value.toFixed(places);
  // "-0.0" is not a figure anyone measured.
  return Number(text) === 0 ? (0).toFixed(places) : text;
}
