import type { TestMethodEntry } from '@web/lib/test-methods';

// What the characteristic form fills in until the administrator types their own, following the
// demo plant's pattern: HVL25-RC28, "HV Level 25 · compressive strength · 28 d".

/** e.g. "HVL25-RC28" for compressive strength at 28 days, "HVL25-FLOW" for a fresh test. */
export function suggestedCode(productCode: string, methodCode: string, ageDays: string): string {
  if (!productCode || !methodCode) return '';
  return `${productCode}-${methodCode}${ageDays.trim()}`;
}

/** A method's name without its apparatus in brackets: "Compressive strength". */
export function shortMethodName(name: string): string {
  return name.replace(/\s*\(.*\)\s*$/, '');
}

/** e.g. "HV Level 25 · compressive strength · 28 d". */
export function suggestedName(productName: string | undefined, method: TestMethodEntry | undefined, ageDays: string): string {
  if (!productName || !method) return '';
  const age = ageDays.trim() ? ` · ${ageDays.trim()} d` : '';
  const short = shortMethodName(method.name);
  return `${productName} · ${short.charAt(0).toLowerCase()}${short.slice(1)}${age}`;
}
