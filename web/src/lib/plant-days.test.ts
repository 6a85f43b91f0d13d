import { describe, expect, it } from 'vitest';
import { formatPlantDay, plantDayOf } from './plant-days';
import { plantDateText } from './plant-dates';
import type { PlantClock } from '@shared/time';

const london: PlantClock = { timeZone: 'Europe/London', dateFormat: 'dd/MM/yyyy' };
// Ten hours behind UTC all year (IANA time zone database): a day read as UTC midnight would show the day before.
const honolulu: PlantClock = { timeZone: 'Pacific/Honolulu', dateFormat: 'MM/dd/yyyy' };

describe('plant days', () => {
  it('shows a calendar day in the plant format, the same day whatever the zone', () => {
    expect(formatPlantDay('2026-12-05', london)).toBe('05/12/2026');
    expect(formatPlantDay('2026-12-05', honolulu)).toBe('12/05/2026');
    expect(formatPlantDay('2026-12-05', { ...london, dateFormat: 'dd.MM.yyyy' })).toBe('05.12.2026');
    // UK clocks go forward on 29 March 2026 (IANA time zone database): the day is still that day.
    expect(formatPlantDay('2026-03-29', london)).toBe('29/03/2026');
    // Not a day: shown as it came rather than hidden.
    expect(formatPlantDay('2026-13-40', london)).toBe('2026-13-40');
    expect(formatPlantDay('soon', london)).toBe('soon');
  });

  it('takes the day a person typed in a plant date field, not the UTC day of its instant', () => {
    // 05/12/2026 in Honolulu starts at 10:00 UTC; in London in summer a day starts at 23:00 UTC the day before.
    expect(plantDayOf(plantDateText('date', honolulu).parse('12/05/2026')!)).toBe('2026-12-05');
    expect(plantDayOf(plantDateText('date', london).parse('14/06/2021')!)).toBe('2021-06-14');
  });
});
