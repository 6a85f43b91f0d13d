import { describe, expect, it } from 'vitest';
import {
  bondClassFor,
  compressiveClassFor,
  compressiveClassValues,
  flexuralClassFor,
  flexuralClassValues,
  formatScreedDesignation,
  parseScreedDesignation,
} from './en13813';

describe('EN 13813 class tables', () => {
  it('lists the compressive and flexural classes of the standard', () => {
    // Compressive classes from memory of EN 13813 Table 2. The flexural list matches the
    // F-class table of a published EN 13813 glossary (fussbodenatlas.de, "Biegezugfestigkeitsklasse").
    expect([...compressiveClassValues]).toEqual([5, 7, 12, 16, 20, 25, 30, 35, 40, 50, 60, 70, 80]);
    expect([...flexuralClassValues]).toEqual([1, 2, 3, 4, 5, 6, 7, 10, 15, 20, 30, 40, 50]);
  });
});

describe('compressiveClassFor', () => {
  it('gives the highest class whose number is ≤ the mean', () => {
    expect(compressiveClassFor(25.0)).toBe('C25');
    expect(compressiveClassFor(24.99)).toBe('C20');
    expect(compressiveClassFor(31.4)).toBe('C30');
    expect(compressiveClassFor(5)).toBe('C5');
    expect(compressiveClassFor(80)).toBe('C80');
    expect(compressiveClassFor(95)).toBe('C80');
  });

  it('gives no class below C5', () => {
    expect(compressiveClassFor(4.99)).toBeNull();
    expect(compressiveClassFor(Number.NaN)).toBeNull();
  });
});

describe('flexuralClassFor', () => {
  it('follows the gaps of the flexural table (F7 then F10)', () => {
    expect(flexuralClassFor(6.0)).toBe('F6');
    expect(flexuralClassFor(5.99)).toBe('F5');
    expect(flexuralClassFor(9.9)).toBe('F7');
    expect(flexuralClassFor(10)).toBe('F10');
    expect(flexuralClassFor(0.9)).toBeNull();
  });
});

describe('bondClassFor (classes from memory of EN 13813)', () => {
  it('gives the highest bond class reached', () => {
    expect(bondClassFor(1.5)).toBe('B1.5');
    expect(bondClassFor(1.49)).toBe('B1.0');
    expect(bondClassFor(2.6)).toBe('B2.0');
    expect(bondClassFor(0.19)).toBeNull();
  });
});

describe('parseScreedDesignation', () => {
  it('reads binder, compressive and flexural class', () => {
    const r = parseScreedDesignation('CT-C25-F6');
    expect(r).toEqual({ ok: true, value: { binder: 'CT', compressive: 'C25', flexural: 'F6', bond: null, further: [] } });
  });

  it('tolerates lower case, spaces and a decimal comma in the bond class', () => {
    const r = parseScreedDesignation(' ct - c30 - f7 - b1,5 ');
    expect(r.ok && r.value).toMatchObject({ binder: 'CT', compressive: 'C30', flexural: 'F7', bond: 'B1.5' });
  });

  it('keeps further properties verbatim and writes them back in order', () => {
    const r = parseScreedDesignation('CT-C40-F7-AR0.5');
    expect(r.ok && r.value.further).toEqual(['AR0.5']);
    expect(r.ok && formatScreedDesignation(r.value)).toBe('CT-C40-F7-AR0.5');
  });

  it('round-trips through formatScreedDesignation', () => {
    for (const text of ['CT-C25-F6', 'CA-C30-F5', 'CT-C30-F7-B1.5']) {
      const r = parseScreedDesignation(text);
      expect(r.ok && formatScreedDesignation(r.value)).toBe(text);
    }
  });

  it('refuses class numbers that are not in the tables', () => {
    expect(parseScreedDesignation('CT-C25-F8')).toMatchObject({ ok: false });
    expect(parseScreedDesignation('CT-C26-F6')).toMatchObject({ ok: false });
    expect(parseScreedDesignation('CT-C25-F6-B0.8')).toMatchObject({ ok: false });
  });

  it('refuses an unknown binder, a missing class for CT, and doubled classes', () => {
    expect(parseScreedDesignation('XX-C25-F6')).toMatchObject({ ok: false });
    expect(parseScreedDesignation('CT-C25')).toMatchObject({ ok: false });
    expect(parseScreedDesignation('CT-C25-C30-F6')).toMatchObject({ ok: false });
  });

  it('lets a synthetic resin material declare a bond class without C and F (from memory)', () => {
    expect(parseScreedDesignation('SR-B1.5-AR1')).toMatchObject({ ok: true, value: { binder: 'SR', bond: 'B1.5', compressive: null } });
  });
});
