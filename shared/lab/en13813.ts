/**
 * EN 13813 classes of screed materials. Each class is named by the strength in MPa (N/mm²)
 * the material must reach; a mean reaches the highest class whose number is ≤ the mean.
 */
export const compressiveClassValues = [5, 7, 12, 16, 20, 25, 30, 35, 40, 50, 60, 70, 80] as const;
export const flexuralClassValues = [1, 2, 3, 4, 5, 6, 7, 10, 15, 20, 30, 40, 50] as const;
/** Bond strength classes (from memory of EN 13813; verify against the current edition). */
export const bondClassValues = [0.2, 0.5, 1.0, 1.5, 2.0] as const;

export type CompressiveClass = `C${(typeof compressiveClassValues)[number]}`;
export type FlexuralClass = `F${(typeof flexuralClassValues)[number]}`;
export type BondClass = 'B0.2' | 'B0.5' | 'B1.0' | 'B1.5' | 'B2.0';

/** Binder codes of EN 13813: cementitious, calcium sulfate, magnesite, mastic asphalt, synthetic resin. */
export const screedBinders = ['CT', 'CA', 'MA', 'AS', 'SR'] as const;
export type ScreedBinder = (typeof screedBinders)[number];

function highestReached(values: readonly number[], mean: number): number | null {
  if (!Number.isFinite(mean)) return null;
  let reached: number | null = null;
  for (const v of values) if (v <= mean) reached = v;
  return reached;
}

/** Compressive class a mean strength in MPa reaches, or null below C5. */
export function compressiveClassFor(meanMPa: number): CompressiveClass | null {
  const v = highestReached(compressiveClassValues, meanMPa);
  return v === null ? null : (`C${v}` as CompressiveClass);
}

/** Flexural class a mean strength in MPa reaches, or null below F1. */
export function flexuralClassFor(meanMPa: number): FlexuralClass | null {
  const v = highestReached(flexuralClassValues, meanMPa);
  return v === null ? null : (`F${v}` as FlexuralClass);
}

/** Bond class a mean tensile adhesion strength in MPa reaches, or null below B0.2. */
export function bondClassFor(meanMPa: number): BondClass | null {
  const v = highestReached(bondClassValues, meanMPa);
  return v === null ? null : (`B${v.toFixed(1)}` as BondClass);
}

/** The strength in MPa a class stands for, e.g. 'C25' → 25, 'B1.5' → 1.5. */
export function classValue(code: CompressiveClass | FlexuralClass | BondClass): number {
  return Number(code.slice(1));
}

/** A screed material designation such as CT-C25-F6. */
export interface ScreedDesignation {
  binder: ScreedBinder;
  compressive: CompressiveClass | null;
  flexural: FlexuralClass | null;
  bond: BondClass | null;
  /** Further declared properties (wear, hardness, …), kept verbatim and in order. */
  further: string[];
}

export type ParseResult = { ok: true; value: ScreedDesignation } | { ok: false; error: string };

// Compressive and flexural classes are required for these binders (from memory of EN 13813).
const needsStrengthClasses: readonly ScreedBinder[] = ['CT', 'CA', 'MA'];

/**
 * Reads a designation like "CT-C25-F6" or "CT-C30-F7-B1.5". Case and a decimal comma
 * ("B1,5") are tolerated; unknown class numbers are refused with a plain reason.
 */
export function parseScreedDesignation(text: string): ParseResult {
  const parts = text.trim().toUpperCase().replace(/,/g, '.').split(/\s*-\s*/);
  const [binder, ...rest] = parts;
  if (!(screedBinders as readonly string[]).includes(binder)) {
    return { ok: false, error: `"${text}" does not start with a binder code (${screedBinders.join(', ')})` };
  }
  const value: ScreedDesignation = { binder: binder as ScreedBinder, compressive: null, flexural: null, bond: null, further: [] };
  for (const part of rest) {
    const m = /^([CFB])(\d+(?:\.\d+)?)$/.exec(part);
    if (!m) {
      if (part === '') return { ok: false, error: `"${text}" has an empty part` };
      value.further.push(part);
      continue;
    }
    const [, letter, digits] = m;
    const n = Number(digits);
    if (letter === 'C') {
      if (value.compressive) return { ok: false, error: `"${text}" names two compressive classes` };
      if (!(compressiveClassValues as readonly number[]).includes(n)) return { ok: false, error: `C${digits} is not a compressive class of EN 13813` };
      value.compressive = `C${n}` as CompressiveClass;
    } else if (letter === 'F') {
      if (value.flexural) return { ok: false, error: `"${text}" names two flexural classes` };
      if (!(flexuralClassValues as readonly number[]).includes(n)) return { ok: false, error: `F${digits} is not a flexural class of EN 13813` };
      value.flexural = `F${n}` as FlexuralClass;
    } else {
      if (value.bond) return { ok: false, error: `"${text}" names two bond classes` };
      if (!(bondClassValues as readonly number[]).includes(n)) return { ok: false, error: `B${digits} is not a bond class of EN 13813` };
      value.bond = `B${n.toFixed(1)}` as BondClass;
    }
  }
  if (needsStrengthClasses.includes(value.binder) && (!value.compressive || !value.flexural)) {
    return { ok: false, error: `A ${value.binder} screed material declares both a compressive (C) and a flexural (F) class` };
  }
  return { ok: true, value };
}

/** Writes a designation back in the usual order: binder, C, F, B, then the further properties. */
export function formatScreedDesignation(d: ScreedDesignation): string {
  return [d.binder, d.compressive, d.flexural, d.bond, ...d.further].filter(Boolean).join('-');
}
