import { afterAll, beforeAll, describe, expect, it } from 'vitest';

// Offsets of Europe/Berlin from the IANA time zone database: CET (UTC+1) in winter, CEST (UTC+2) in summer;
// summer time starts on the last Sunday of March at 01:00 UTC (EU Directive 2000/84/EC), 29 March in 2026.
const previousZone = process.env.TZ;
let lib: typeof import('./date-time');

beforeAll(async () => {
  process.env.TZ = 'Europe/Berlin';
  lib = await import('./date-time');
});

afterAll(() => {
  if (previousZone === undefined) delete process.env.TZ;
  else process.env.TZ = previousZone;
});

describe('times typed in the browser zone', () => {
  it('sends winter and summer wall times with the offset in force on that day', () => {
    expect(lib.localInputToIso('2026-01-15T06:00')).toBe('2026-01-15T06:00:00+01:00');
    expect(lib.localInputToIso('2026-07-15T06:00')).toBe('2026-07-15T06:00:00+02:00');
    expect(new Date(lib.localInputToIso('2026-07-15T06:00')!).toISOString()).toBe('2026-07-15T04:00:00.000Z');
  });

  it('leaves an empty field empty', () => {
    expect(lib.localInputToIso('  ')).toBeUndefined();
  });

  it('gives a wall time skipped by the spring clock change an offset that matches its instant', () => {
    // 02:30 does not exist on 29 March 2026 in Berlin; whatever instant the engine picks, the text must name it.
    const iso = lib.localInputToIso('2026-03-29T02:30')!;
    expect(Date.parse(iso)).toBe(new Date('2026-03-29T02:30').getTime());
    expect(iso).toMatch(/^2026-03-29T0[13]:30:00\+0[12]:00$/);
  });

  it('reads a date as the start of that day, and the day after for an end of period', () => {
    expect(lib.localDateToIso('2021-06-01')).toBe('2021-06-01T00:00:00+02:00');
    expect(lib.localDateToIso('2021-06-30', 1)).toBe('2021-07-01T00:00:00+02:00');
    expect(lib.localDateToIso('')).toBeUndefined();
  });

  it('shows a stored instant in the browser zone with the zone named', () => {
    expect(lib.formatWithZone('2026-01-15T05:00:00Z')).toBe('15 Jan 2026, 06:00 CET');
    expect(lib.formatWithZone('2026-07-15T04:00:00Z')).toBe('15 Jul 2026, 06:00 CEST');
  });

  it('proposes now to the minute in the form the date-time field takes', () => {
    expect(lib.nowAsLocalInput(new Date('2026-07-15T04:00:59Z'))).toBe('2026-07-15T06:00');
  });
});
