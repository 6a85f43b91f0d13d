import { describe, expect, it } from 'vitest';
import { demoEndDate } from './index';

describe('demoEndDate', () => {
  it('ends the demo history at the last 06:00 UTC that has passed, never in the future', () => {
    expect(demoEndDate(new Date('2026-12-02T00:05:00Z')).toISOString()).toBe('2026-12-01T06:00:00.000Z');
    expect(demoEndDate(new Date('2026-12-02T05:59:59Z')).toISOString()).toBe('2026-12-01T06:00:00.000Z');
    expect(demoEndDate(new Date('2026-12-02T06:00:00Z')).toISOString()).toBe('2026-12-02T06:00:00.000Z');
    expect(demoEndDate(new Date('2026-12-02T23:59:00Z')).toISOString()).toBe('2026-12-02T06:00:00.000Z');
    expect(demoEndDate(new Date('2027-01-01T01:00:00Z')).toISOString()).toBe('2026-12-31T06:00:00.000Z');
  });
});
