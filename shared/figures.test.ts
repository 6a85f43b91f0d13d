// Figure formatting. Rounding expectations follow ECMA-402 (Intl.NumberFormat, roundingMode "halfExpand")
// and ECMA-262 Number.prototype.toFixed; grouping with a comma every three digits is the en-GB convention (CLDR).
import { describe, expect, it } from 'vitest';
import { csvFigure, formatFigure, formatQuantity } from './figures';

describe('figures for people', () => {
  it('groups thousands and keeps the characteristic decimals', () => {
    expect(formatFigure(1501.2, 0)).toBe('1,501');
    expect(formatFigure(30.849999999999994, 1)).toBe('30.8');
    expect(formatFigure(2.5, 2)).toBe('2.50');
    expect(formatQuantity(1490, 0, 'kg/m³')).toBe('1,490 kg/m³');
    expect(formatQuantity(1.337, 2, null)).toBe('1.34');
  });
  it('shows an en dash for a missing figure', () => {
    expect(formatFigure(null, 1)).toBe('–');
    expect(formatFigure(Number.NaN, 1)).toBe('–');
    expect(formatQuantity(undefined, 1, 'MPa')).toBe('–');
  });
});

describe('figures for CSV', () => {
  it('writes no floating-point noise and no grouping', () => {
    expect(csvFigure(30.849999999999994, 2)).toBe('30.85');
    expect(csvFigure(1501.2, 0)).toBe('1501');
    expect(csvFigure(-0.01, 1)).toBe('0.0');
    expect(csvFigure(null, 1)).toBe('');
  });
});
