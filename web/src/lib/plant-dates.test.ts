import { describe, expect, it } from 'vitest';
import { plantDateError, plantDatePlaceholder, plantDateText, plantDayAfter, readPlantInput } from './plant-dates';
import type { PlantClock } from '@shared/time';

const london: PlantClock = { timeZone: 'Europe/London', dateFormat: 'dd/MM/yyyy' };

describe('plant date fields', () => {
  it('asks for and reads the plant format, not the browser locale', () => {
    expect(plantDatePlaceholder('dateTime', london)).toBe('dd/mm/yyyy hh:mm');
    expect(plantDatePlaceholder('date', { ...london, dateFormat: 'yyyy-MM-dd' })).toBe('yyyy-mm-dd');
    // UK summer time is UTC+1 in June (IANA time zone database).
    expect(readPlantInput('dateTime', '14/06/2021 08:30', london)?.toISOString()).toBe('2021-06-14T07:30:00.000Z');
    expect(readPlantInput('dateTime', '2021-06-14T08:30', london)).toBeNull();
    expect(readPlantInput('date', '14/06/2021', london)?.toISOString()).toBe('2021-06-13T23:00:00.000Z');
  });

  it('gives the form the instant with the plant offset, undefined when blank, and the plant-format message otherwise', () => {
    const field = plantDateText('dateTime', london, 'Give the date and time');
    expect(field.parse('14/06/2021 08:30')).toBe('2021-06-14T08:30:00+01:00');
    expect(plantDateText('dateTime', london).parse('  ')).toBeUndefined();
    expect(field.safeParse('').error?.issues[0].message).toBe('Give the date and time');
    expect(field.safeParse('06/14/2021 08:30').error?.issues[0].message).toBe(plantDateError('dateTime', london));
    expect(plantDateError('dateTime', london)).toBe('Type the date and time as dd/mm/yyyy hh:mm, e.g. 30/11/2026 06:15');
  });

  it('ends a period at the start of the plant’s next day across the spring clock change', () => {
    // UK clocks go forward at 01:00 GMT on the last Sunday of March, 29 March 2026 (IANA time zone database):
    // that day has 23 hours, so its end is 23:00 UTC, not midnight UTC.
    const sunday = readPlantInput('date', '29/03/2026', london)!;
    expect(sunday.toISOString()).toBe('2026-03-29T00:00:00.000Z');
    expect(plantDayAfter(sunday, london).toISOString()).toBe('2026-03-29T23:00:00.000Z');
  });
});
