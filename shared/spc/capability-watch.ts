// When a characteristic's capability is "falling": the pure decision behind the falling-capability
// alarm of the nightly run (api/spc/capability-alarm.ts). The index is Cpk over the rolling window of
// the newest lots, or Ppk where the chart of that window is not in statistical control (Cpk, from sigma
// within, describes a process that is in control: ISO 22514-2 reads it only then; common practice).
import type { CapabilityResult } from './capability';

/** The threshold when neither the characteristic nor the plant sets one (a widely used minimum Cpk; common practice). */
export const DEFAULT_CAPABILITY_THRESHOLD = 1.33;

/**
 * The rolling window: the newest 100 lots. A hundred lots give an individuals chart the 100 values
 * below which capability is only preliminary (CAPABILITY_MIN_VALUES), and a chart of subgroups of two or
 * more at least 25 subgroups and 200 values; older lots roll out as new ones come in.
 */
export const CAPABILITY_WINDOW_LOTS = 100;

export interface CapabilityReading {
  index: 'Cpk' | 'Ppk';
  value: number;
}

/**
 * The index to compare with the threshold, or null when there is none to judge. Rule chosen: no
 * judgement on a preliminary estimate (fewer than 25 subgroups or 100 values, CAPABILITY_MIN_SUBGROUPS
 * and CAPABILITY_MIN_VALUES), without a specification limit, or without the index (no variation, no
 * sigma within). A small sample's Cpk scatters widely (Bissell's interval at 20 values is about ±0.5
 * around 1.33), so an alarm on it would mostly be noise; the watch then keeps its last state.
 */
export function capabilityReading(capability: CapabilityResult | null, inControl: boolean): CapabilityReading | null {
  if (!capability || capability.preliminary) return null;
  const index = inControl ? 'Cpk' : 'Ppk';
  const value = inControl ? capability.cpk : capability.ppk;
  return value === null || !Number.isFinite(value) ? null : { index, value };
}

export interface CapabilityCrossing {
  below: boolean;
  /** Raise an alarm: below now, and not below at the last judgement (or never judged before). */
  raise: boolean;
}

/**
 * Once per crossing: an alarm when the index is below the threshold now and was not below at the last
 * judgement; none while it stays below; rising to the threshold or above re-arms it. An index exactly
 * on the threshold is not below (the threshold is the minimum acceptable value).
 */
export function capabilityCrossing(wasBelow: boolean | null, reading: CapabilityReading, threshold: number): CapabilityCrossing {
  const below = reading.value < threshold;
  return { below, raise: below && wasBelow !== true };
}
