import { formatPlantDate, formatPlantDateTime } from '@shared/time';
import { usePlantClock } from '@web/lib/catalogue';

/**
 * An instant from the API as the plant's wall clock in the plant's date format ("30/11/2026 06:15"), in a
 * <time> element that keeps the exact instant. No zone beside it: the page footer names the plant's once.
 */
export function PlantTime({ at, kind = 'dateTime', className }: { at: string | Date; kind?: 'date' | 'dateTime'; className?: string }) {
  const clock = usePlantClock().data;
  const iso = at instanceof Date ? at.toISOString() : at;
  // Until the plant's clock has loaded nothing is shown rather than a time in the wrong zone.
  const text = clock ? (kind === 'date' ? formatPlantDate(at, clock) : formatPlantDateTime(at, clock)) : '';
  return (
    <time dateTime={iso} className={className}>
      {text}
    </time>
  );
}
