import type { SpecInForce } from '../api/catalogue';

export interface SpecVerdict {
  tone: 'positive' | 'negative' | 'neutral';
  label: string;
}

/** Whether a result meets the specification in force; limits are compared unrounded. */
export function specVerdict(value: number, spec: SpecInForce | null, unit: string, decimals: number): SpecVerdict {
  if (!spec || (spec.lsl === null && spec.usl === null)) return { tone: 'neutral', label: 'No specification in force' };
  if (spec.lsl !== null && value < spec.lsl) return { tone: 'negative', label: `Below LSL ${spec.lsl.toFixed(decimals)} ${unit}` };
  if (spec.usl !== null && value > spec.usl) return { tone: 'negative', label: `Above USL ${spec.usl.toFixed(decimals)} ${unit}` };
  return { tone: 'positive', label: 'Within specification' };
}

/** The limits in words, e.g. "LSL 25.0 MPa" or "135 – 155 mm (target 145)". */
export function specLimitsText(spec: SpecInForce | null, unit: string, decimals: number): string {
  if (!spec || (spec.lsl === null && spec.usl === null)) return 'No specification in force';
  const f = (v: number) => v.toFixed(decimals);
  const target = spec.target !== null ? ` (target ${f(spec.target)})` : '';
  if (spec.lsl !== null && spec.usl !== null) return `${f(spec.lsl)} – ${f(spec.usl)} ${unit}${target}`;
  if (spec.lsl !== null) return `LSL ${f(spec.lsl)} ${unit}${target}`;
  return `USL ${f(spec.usl!)} ${unit}${target}`;
}

/**
 * The revision in force at an instant, as the lot page's server answer picks it: the latest effective date
 * not after the instant, the higher revision on a tie; null when none had taken effect yet.
 */
export function specInForceAt<T extends Pick<SpecInForce, 'revision' | 'effectiveFrom'>>(revisions: readonly T[], instantMs: number): T | null {
  let found: T | null = null;
  let foundMs = -Infinity;
  for (const r of revisions) {
    const from = Date.parse(r.effectiveFrom);
    if (from > instantMs) continue;
    if (from > foundMs || (from === foundMs && found !== null && r.revision > found.revision)) {
      found = r;
      foundMs = from;
    }
  }
  return found;
}
