// Sizes in decimal units as IEC 80000-13 defines kB and MB (1 kB = 1000 bytes), the units desktop file
// managers show for a file; counts grouped in thousands as en-GB writes them (Intl, ECMA-402).
import { describe, expect, it } from 'vitest';
import { formatBytes, formatCount } from './format';

describe('formatBytes', () => {
  it('gives bytes, kilobytes and megabytes at the decimal thresholds', () => {
    expect(formatBytes(0)).toBe('0 bytes');
    expect(formatBytes(999)).toBe('999 bytes');
    expect(formatBytes(1000)).toBe('1 kB');
    expect(formatBytes(14_249)).toBe('14.2 kB');
    expect(formatBytes(999_949)).toBe('999.9 kB');
    expect(formatBytes(999_960)).toBe('1 MB');
    expect(formatBytes(10_115_240)).toBe('10.1 MB');
    expect(formatBytes(20 * 1024 * 1024)).toBe('21 MB');
  });
});

describe('formatCount', () => {
  it('groups thousands', () => {
    expect(formatCount(31_843)).toBe('31,843');
    expect(formatCount(100_000)).toBe('100,000');
  });
});
