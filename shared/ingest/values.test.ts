import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import { detectDialect } from './dialect';
import { localToUtcMs, parseNumber, parsePlantDateTime, zoneOffsetMinutes } from './values';

describe('parseNumber', () => {
  it('reads dot and comma decimals as the file declares them', () => {
    expect(parseNumber('12.5', false)).toBe(12.5);
    expect(parseNumber(' 12,5 ', true)).toBe(12.5);
    expect(parseNumber('1 234,5', true)).toBe(1234.5);
    expect(parseNumber('1.234,5', true)).toBe(1234.5);
    expect(parseNumber('-0.25', false)).toBe(-0.25);
    expect(parseNumber('3e2', false)).toBe(300);
  });

  it('refuses what is not a number rather than guessing', () => {
    for (const text of ['', 'abc', '12,5', '=1+1', '1.2.3', 'NaN', 'Infinity', '12 mm']) expect(parseNumber(text, false)).toBeNull();
    expect(parseNumber('12.5.1', true)).toBeNull();
  });
});

describe('parsePlantDateTime against ECMAScript Date.parse', () => {
  // ECMA-262 §21.4.1.32 (Date Time String Format) is an independent reading of the same ISO 8601 shapes.
  it('gives the instant Date.parse gives for dates with Z or an offset, with or without seconds', () => {
    const two = (n: number) => String(n).padStart(2, '0');
    fc.assert(
      fc.property(
        fc.record({ y: fc.integer({ min: 1900, max: 2999 }), mo: fc.integer({ min: 1, max: 12 }), d: fc.integer({ min: 1, max: 28 }), h: fc.integer({ min: 0, max: 23 }), mi: fc.integer({ min: 0, max: 59 }), s: fc.option(fc.integer({ min: 0, max: 59 })), zone: fc.constantFrom('Z', '+01:00', '-05:30', '+00:00', '+14:00') }),
        ({ y, mo, d, h, mi, s, zone }) => {
          const text = `${y}-${two(mo)}-${two(d)}T${two(h)}:${two(mi)}${s === null ? '' : `:${two(s)}`}${zone}`;
          expect(parsePlantDateTime(text, 'Europe/London')).toBe(Date.parse(text));
        },
      ),
      { numRuns: 500 },
    );
    expect(parsePlantDateTime('2026-11-30T06:15:00.750Z', 'UTC')).toBe(Date.parse('2026-11-30T06:15:00Z'));
    expect(parsePlantDateTime('2026-02-30T06:15Z', 'UTC')).toBeNull();
    expect(parsePlantDateTime('2026-11-30T06:15 +0100', 'UTC')).toBe(Date.parse('2026-11-30T05:15Z'));
  });
});

describe('parsePlantDateTime (Europe/London)', () => {
  const tz = 'Europe/London';
  // UK clocks: UTC+0 in winter, UTC+1 from 01:00 UTC on the last Sunday of March to 01:00 UTC on the
  // last Sunday of October (IANA time zone database, Europe/London; Summer Time Order 2002).
  it('reads plant-local times in winter and summer', () => {
    expect(new Date(parsePlantDateTime('15.01.2026 08:00', tz)!).toISOString()).toBe('2026-01-15T08:00:00.000Z');
    expect(new Date(parsePlantDateTime('15.07.2026 08:00', tz)!).toISOString()).toBe('2026-07-15T07:00:00.000Z');
    expect(new Date(parsePlantDateTime('2026-07-15T08:00', tz)!).toISOString()).toBe('2026-07-15T07:00:00.000Z');
    expect(new Date(parsePlantDateTime('2026-07-15 08:00:30', tz)!).toISOString()).toBe('2026-07-15T07:00:30.000Z');
  });

  it('honours an explicit offset whatever the plant zone', () => {
    expect(new Date(parsePlantDateTime('2026-07-15T08:00:00Z', tz)!).toISOString()).toBe('2026-07-15T08:00:00.000Z');
    expect(new Date(parsePlantDateTime('2026-07-15T08:00:00+02:00', tz)!).toISOString()).toBe('2026-07-15T06:00:00.000Z');
    expect(new Date(parsePlantDateTime('2026-07-15T08:00:00-0530', tz)!).toISOString()).toBe('2026-07-15T13:30:00.000Z');
  });

  it('takes the earlier instant in the autumn hour that occurs twice, and handles the spring gap', () => {
    // 25 Oct 2026 01:30 happens at 00:30Z (BST) and again at 01:30Z (GMT).
    expect(new Date(parsePlantDateTime('25.10.2026 01:30', tz)!).toISOString()).toBe('2026-10-25T00:30:00.000Z');
    expect(new Date(parsePlantDateTime('25.10.2026 03:00', tz)!).toISOString()).toBe('2026-10-25T03:00:00.000Z');
    expect(new Date(parsePlantDateTime('29.03.2026 03:00', tz)!).toISOString()).toBe('2026-03-29T02:00:00.000Z');
  });

  it('agrees with the runtime time-zone data at every hour of a year', () => {
    for (let t = Date.UTC(2026, 0, 1); t < Date.UTC(2027, 0, 1); t += 3_600_000) {
      const local = new Date(t + zoneOffsetMinutes(t, tz) * 60_000);
      const back = localToUtcMs(local.getUTCFullYear(), local.getUTCMonth() + 1, local.getUTCDate(), local.getUTCHours(), local.getUTCMinutes(), 0, tz);
      // The first hour after the autumn change has a twin an hour earlier, which wins; every other hour maps back exactly.
      const afterAutumnChange = zoneOffsetMinutes(t, tz) < zoneOffsetMinutes(t - 3_600_000, tz);
      expect(back).toBe(afterAutumnChange ? t - 3_600_000 : t);
    }
  });

  it('refuses impossible dates and other formats', () => {
    for (const text of ['31.02.2026 06:00', '2026-13-01', '29.02.2026', '2026-02-30T00:00', '12/01/2026', '2026-01-01T25:00', 'yesterday', '']) {
      expect(parsePlantDateTime(text, tz)).toBeNull();
    }
    expect(parsePlantDateTime('29.02.2028', tz)).not.toBeNull();
  });
});

describe('detectDialect', () => {
  it('finds ";" with decimal commas in a European export, and papaparse then splits it the same way', () => {
    const text = 'lot;value;note\nA1;12,5;ok\nA2;13,0;"a; b"\n';
    const d = detectDialect(text);
    expect(d).toEqual({ delimiter: ';', decimalComma: true });
    // Reference: papaparse's own delimiter guess on the same text.
    expect(Papa.parse(text, { header: true }).meta.delimiter).toBe(';');
  });

  it('keeps "," with dot decimals, and tab-separated files', () => {
    expect(detectDialect('lot,value\nA1,12.5\n')).toEqual({ delimiter: ',', decimalComma: false });
    expect(detectDialect('lot\tvalue\nA1\t12,5\n')).toEqual({ delimiter: '\t', decimalComma: true });
  });

  it('is not fooled by commas inside quoted notes', () => {
    expect(detectDialect('lot;value;note\nA1;12.5;"x, y, z"\nA2;12.7;"p, q"\n').delimiter).toBe(';');
  });
});
