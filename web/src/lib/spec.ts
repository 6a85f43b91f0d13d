import { specVerdict } from '@shared/spc';
import type { SpecInForce } from './catalogue';

export interface SpecVerdictBadge {
  tone: 'positive' | 'negative' | 'neutral';
  label: string;
}

/** The verdict of shared/spc (a result on a limit is in) as a badge; limits are compared unrounded. */
export function specVerdictBadge(value: number, spec: SpecInForce | null, unit: string, decimals: number): SpecVerdictBadge {
  const verdict = specVerdict(value, spec);
  if (verdict === 'no-spec') return { tone: 'neutral', label: 'No specification in force' };
  if (verdict === 'below-lsl') return { tone: 'negative', label: `Below LSL ${spec!.lsl!.toFixed(decimals)} ${unit}` };
  if (verdict === 'above-usl') return { tone: 'negative', label: `Above USL ${spec!.usl!.toFixed(decimals)} ${unit}` };
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
