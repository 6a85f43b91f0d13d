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
