import { type ForceReading, toNewtons } from './units';

/** The steel head glued to the test area and pulled off at right angles to the surface. */
export type PullHead =
  | { shape: 'square'; sideMm: number }
  | { shape: 'round'; diameterMm: number };

/** The 50 × 50 mm square head, the size of the tiles in tile adhesive testing. */
export const squareHead50: PullHead = { shape: 'square', sideMm: 50 };
/** The Ø 50 mm round head, usual for pull-off tests on screeds and repair mortars. */
export const roundHead50: PullHead = { shape: 'round', diameterMm: 50 };

/** Test area under the pull head in mm². */
export function pullHeadAreaMm2(head: PullHead): number {
  const size = head.shape === 'square' ? head.sideMm : head.diameterMm;
  if (!Number.isFinite(size) || size <= 0) throw new RangeError('Pull-head size must be > 0 mm');
  return head.shape === 'square' ? size * size : (Math.PI * size * size) / 4;
}

/**
 * Tensile adhesion (pull-off) strength = pull-off force / test area, in MPa (EN 13892-8 for
 * screeds; the same quotient in EN 12004-2 for tile adhesives and EN 1542 for repair mortars).
 */
export function pullOffStrength(force: ForceReading, head: PullHead): number {
  return toNewtons(force) / pullHeadAreaMm2(head);
}
