// Plant-clock formatting and reading. Expected offsets are from the IANA time zone database rules for
// Europe/London (GMT in winter, BST = UTC+1 from the last Sunday of March to the last Sunday of October)
// and Europe/Berlin; the ISO form is ISO 8601-1:2019 §5.4 (date and time with a UTC offset).
import { describe, expect, it } from 'vitest';
import { formatPlantDate, formatPlantDateTime, plantDay, plantIso, plantTimeNote, readPlantDate, readPlantDateTime, zoneAbbreviation, type PlantClock } from './time';
import { parsePlantDateTime } from './ingest/values';

const london: PlantClock = { timeZone: 'Europe/London', dateFormat: 'dd/MM/yyyy' };

describe('showing plant time', () => {
  it('writes summer and winter instants as the plant wall clock (IANA Europe/London)', () => {
    expect(formatPlantDateTime('2026-07-01T05:15:00Z', london)).toBe('01/07/2026 06:15');
    expect(formatPlantDateTime('2026-11-30T06:15:00Z', london)).toBe('30/11/2026 06:15');
    expect(formatPlantDate(new Date('2026-07-01T23:30:00Z'), london)).toBe('02/07/2026');
    expect(formatPlantDateTime('2026-07-01T05:15:00Z', { timeZone: 'Europe/Berlin', dateFormat: 'dd.MM.yyyy' })).toBe('01.07.2026 07:15');
    expect(formatPlantDateTime('2026-07-01T05:15:00Z', { timeZone: 'America/Chicago', dateFormat: 'MM/dd/yyyy' })).toBe('07/01/2026 00:15');
  });

  it('writes exports as ISO 8601 with the plant offset, and names the zone', () => {
    expect(plantIso('2026-07-01T05:15:00Z', 'Europe/London')).toBe('2026-07-01T06:15:00+01:00');
    expect(plantIso('2026-12-01T05:15:00Z', 'Europe/London')).toBe('2026-12-01T05:15:00+00:00');
    expect(zoneAbbreviation('Europe/London', '2026-07-01T00:00:00Z')).toBe('BST');
    expect(zoneAbbreviation('Europe/London', '2026-12-01T00:00:00Z')).toBe('GMT');
    expect(plantTimeNote('Europe/London', '2026-12-01T00:00:00Z')).toBe('Times are plant time (Europe/London, GMT)');
    expect(plantDay('2026-07-01T23:30:00Z', 'Europe/London')).toBe('2026-07-02');
  });

  it('leaves an unreadable time as it came rather than printing "Invalid Date"', () => {
    expect(formatPlantDateTime('not a time', london)).toBe('not a time');
  });
});

describe('reading what a person types', () => {
  it('reads the plant format in the plant zone', () => {
    expect(readPlantDateTime('01/07/2026 06:15', london)?.toISOString()).toBe('2026-07-01T05:15:00.000Z');
    expect(readPlantDateTime(' 30/11/2026  06:15 ', london)?.toISOString()).toBe('2026-11-30T06:15:00.000Z');
    expect(readPlantDate('01/07/2026', london)?.toISOString()).toBe('2026-06-30T23:00:00.000Z');
    expect(readPlantDate('2026-07-01', { timeZone: 'Europe/London', dateFormat: 'yyyy-MM-dd' })?.toISOString()).toBe('2026-06-30T23:00:00.000Z');
  });

  it('refuses dates that do not exist, two-digit years and the other order', () => {
    expect(readPlantDate('31/02/2026', london)).toBeNull();
    expect(readPlantDate('1/7/26', london)).toBeNull();
    expect(readPlantDate('2026-07-01', london)).toBeNull();
    expect(readPlantDateTime('01/07/2026 25:00', london)).toBeNull();
    expect(readPlantDateTime('', london)).toBeNull();
  });

  it('takes the earlier instant of the repeated autumn hour, as the CSV import does', () => {
    // 25 Oct 2026 01:30 happens twice in London: 00:30Z (BST) and 01:30Z (GMT).
    const typed = readPlantDateTime('25/10/2026 01:30', london);
    expect(typed?.toISOString()).toBe('2026-10-25T00:30:00.000Z');
    expect(typed?.getTime()).toBe(parsePlantDateTime('2026-10-25 01:30', 'Europe/London'));
  });
});
